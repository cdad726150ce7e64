/// <reference types="google.maps" />
/// <reference lib="dom" />
/**
 * Offline stand-in for the part of the hosted maps JavaScript API that Evalon's Angular client
 * uses through `@angular/google-maps`. Loaded as a classic script (our server serves it at
 * `GET /maps/api/js` when no maps API key is configured), it fills `window.google.maps` and then
 * calls the function named by the script URL's `callback` parameter, as the hosted loader does.
 */
import { event } from './events';
import { LatLng, LatLngBounds, Point, Size } from './geo';
import { StandinInfoWindow } from './info-window';
import { StandinMap } from './map';
import { defineAdvancedMarker, StandinMarker } from './marker';
import { MVCObject } from './mvc';

/** Value of `google.maps.version`, by which the app can tell the stand-in is loaded. */
export const STANDIN_VERSION = 'evalon-offline';

/** The window, seen without the hosted API's typings for `google` (the stand-in fills it). */
type Win = Omit<Window & typeof globalThis, 'google'> & {
  google?: { maps?: Record<string, unknown> };
};

/** Builds the namespace objects and the libraries that `importLibrary` hands out. */
function buildNamespace(win: Win) {
  const AdvancedMarkerElement = defineAdvancedMarker(win as Window & typeof globalThis);
  const MapTypeId = {
    HYBRID: 'hybrid',
    ROADMAP: 'roadmap',
    SATELLITE: 'satellite',
    TERRAIN: 'terrain',
  };
  const core = { LatLng, LatLngBounds, MVCObject, Point, Size, event };
  const libraries: Record<string, Record<string, unknown>> = {
    core,
    maps: { Map: StandinMap, InfoWindow: StandinInfoWindow, MapTypeId },
    marker: { Marker: StandinMarker, AdvancedMarkerElement },
  };
  const namespace: Record<string, unknown> = {
    ...core,
    Map: StandinMap,
    Marker: StandinMarker,
    InfoWindow: StandinInfoWindow,
    MapTypeId,
    marker: { AdvancedMarkerElement },
    version: STANDIN_VERSION,
    /** As `google.maps.importLibrary`: resolves with the library's classes, rejects the rest. */
    importLibrary(name: string): Promise<Record<string, unknown>> {
      const lib = libraries[name];
      if (lib) return Promise.resolve(lib);
      return Promise.reject(
        new Error(
          `The offline map stand-in has no "${name}" library (it has: core, maps, marker).`,
        ),
      );
    },
  };
  return namespace;
}

/** The URL of this script, read while it runs (a fallback looks for the loader's path). */
function scriptUrl(doc: Document): string | null {
  const current = doc.currentScript as HTMLScriptElement | null;
  if (current?.src) return current.src;
  const tags = doc.querySelectorAll<HTMLScriptElement>('script[src*="/maps/api/js"]');
  return tags.length ? tags[tags.length - 1].src : null;
}

/** Finds a function by a dotted global path such as `initMap` or `google.maps.__ib__`. */
function resolveCallback(win: Win, path: string): ((...args: unknown[]) => unknown) | null {
  let value: unknown = win;
  for (const part of path.split('.')) {
    if (value === null || value === undefined) return null;
    value = (value as Record<string, unknown>)[part];
  }
  return typeof value === 'function' ? (value as (...args: unknown[]) => unknown) : null;
}

/**
 * Installs the stand-in into `win.google.maps`. An existing `google.maps` object is filled in
 * rather than replaced, so the hosted API's inline bootstrap loader (which keeps a reference to
 * it and waits on `google.maps.__ib__`) also works.
 */
export function install(win: Win): void {
  const google = (win.google ??= {});
  const maps = (google.maps ??= {});
  if (maps['version'] !== STANDIN_VERSION) Object.assign(maps, buildNamespace(win));

  const src = scriptUrl(win.document);
  const callback = src ? new URL(src, win.location.href).searchParams.get('callback') : null;
  if (!callback) return;
  // Called after this script has finished, as the hosted loader calls it asynchronously.
  setTimeout(() => {
    const fn = resolveCallback(win, callback);
    if (fn) fn();
    else console.error(`InvalidValueError: ${callback} is not a function`);
  }, 0);
}

install(window as unknown as Win);
