import { DOCUMENT } from '@angular/common';
import { HttpClient } from '@angular/common/http';
import { Injectable, inject, signal } from '@angular/core';
import type { MapsConfig } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';

/** Where loading the maps script stands. */
export type MapsStatus = 'idle' | 'loading' | 'ready' | 'failed';

/** Global function the script calls once `google.maps` is usable (the loader's `callback`). */
export const MAPS_CALLBACK = '__evalonMapsReady';

/** How long to wait for the script before telling people the map is unavailable. */
export const MAPS_TIMEOUT_MS = 20_000;

type MapsWindow = Window & { google?: { maps?: unknown }; [MAPS_CALLBACK]?: () => void };

/**
 * Loads the maps script once, lazily, for the pages that show a map. Where it comes from is the
 * server's call (`GET /api/config/maps`): the hosted script with a browser key, or our own
 * offline stand-in at `/maps/api/js`. `@angular/google-maps` components need `google.maps` to
 * exist before they render, so pages show them only once {@link status} is `ready`.
 */
@Injectable({ providedIn: 'root' })
export class MapsLoader {
  private readonly http = inject(HttpClient);
  private readonly document = inject(DOCUMENT);
  private pending: Promise<void> | null = null;
  private readonly statusState = signal<MapsStatus>('idle');
  private readonly offlineState = signal(false);

  /** Where loading stands; pages render the map at `ready`. */
  readonly status = this.statusState.asReadonly();
  /** Whether the offline stand-in (country outlines, no streets) is what loaded. */
  readonly offline = this.offlineState.asReadonly();

  /**
   * Loads the script if it is not there yet; resolves when `google.maps` is usable. A failure
   * is not remembered, so a later call tries again.
   */
  load(): Promise<void> {
    const win = this.document.defaultView as MapsWindow | null;
    if (win?.google?.maps) {
      this.statusState.set('ready');
      return Promise.resolve();
    }
    this.pending ??= this.inject(win).then(
      () => this.statusState.set('ready'),
      (error: unknown) => {
        this.pending = null;
        this.statusState.set('failed');
        throw error;
      },
    );
    return this.pending;
  }

  private async inject(win: MapsWindow | null): Promise<void> {
    if (!win) throw new Error('Maps need a browser window.');
    this.statusState.set('loading');
    const config = await firstValueFrom(this.http.get<MapsConfig>('/api/config/maps'));
    this.offlineState.set(config.offline);
    const url = new URL(config.scriptUrl, this.document.baseURI);
    url.searchParams.set('callback', MAPS_CALLBACK);
    if (config.apiKey) {
      url.searchParams.set('key', config.apiKey);
      // The hosted loader's recommended mode; the components then use importLibrary().
      url.searchParams.set('loading', 'async');
    }
    await new Promise<void>((resolve, reject) => {
      const script = this.document.createElement('script');
      const timer = win.setTimeout(
        () => fail(new Error('The map took too long to load.')),
        MAPS_TIMEOUT_MS,
      );
      const fail = (error: Error) => {
        win.clearTimeout(timer);
        delete win[MAPS_CALLBACK];
        script.remove();
        reject(error);
      };
      win[MAPS_CALLBACK] = () => {
        win.clearTimeout(timer);
        delete win[MAPS_CALLBACK];
        resolve();
      };
      script.src = url.toString();
      script.async = true;
      script.onerror = () => fail(new Error('The map script could not be loaded.'));
      this.document.head.appendChild(script);
    });
  }
}
