import { DOCUMENT } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { GoogleMap, MapAdvancedMarker } from '@angular/google-maps';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import {
  shipmentRisks,
  shipmentStateLabels,
  type ShipmentMapEntry,
  type ShipmentRisk,
} from '@evalon/contracts';
import { messageOf } from '../../core/api-error';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe } from '../../shared/formats';
import { MapsLoader } from '../../shared/maps-loader';
import { PageHeader } from '../../shared/page-header/page-header';
import { greatCirclePath } from './great-circle';
import { ShipmentApi } from './shipment-api';

/** Colour of a route by its risk: theme tokens, so the map follows the app's theme. */
export const riskColour: Record<ShipmentRisk, string> = {
  on_time: 'var(--mat-sys-primary)',
  at_risk: 'var(--mat-sys-tertiary)',
  overdue: 'var(--mat-sys-error)',
};

export const riskLabels: Record<ShipmentRisk, string> = {
  on_time: 'On time',
  at_risk: 'At risk',
  overdue: 'Overdue',
};

/** One dot of a drawn route, or one of its ends. */
interface Dot {
  key: string;
  position: google.maps.LatLngLiteral;
  title: string;
  content: HTMLElement;
  zIndex: number;
}

/** Points per route: enough for the curve to read as a line at continental zoom. */
const SEGMENTS = 32;

/**
 * `/shipments/map`: every leg with the carrier as a great-circle line from where it left to
 * where it goes (depot → campus outbound, campus → depot back), coloured by risk. The maps API
 * subset the offline stand-in offers has no polylines, so a route is drawn as a dotted line of
 * small markers; the list beside the map says the same for keyboard and screen-reader users.
 */
@Component({
  selector: 'ev-shipment-map',
  imports: [
    DayPipe,
    EmptyState,
    GoogleMap,
    MapAdvancedMarker,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './shipment-map.html',
  styleUrl: './shipment-map.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ShipmentMap {
  private readonly api = inject(ShipmentApi);
  private readonly document = inject(DOCUMENT);
  protected readonly maps = inject(MapsLoader);

  protected readonly stateLabels = shipmentStateLabels;
  protected readonly riskLabels = riskLabels;
  protected readonly riskColour = riskColour;
  protected readonly risks = shipmentRisks;
  protected readonly legs = signal<ShipmentMapEntry[] | null>(null);
  protected readonly total = signal(0);
  protected readonly error = signal<string | null>(null);
  /** The leg picked in the list: drawn on top and fitted. */
  protected readonly selected = signal<number | null>(null);

  protected readonly mapOptions: google.maps.MapOptions = {
    zoom: 3,
    center: { lat: 39.5, lng: -95 },
    // Advanced markers need a map id on the hosted API; the stand-in only stores it.
    mapId: 'evalon-shipments-map',
    disableDefaultUI: true,
    zoomControl: true,
    clickableIcons: false,
  };

  protected readonly dots = computed<Dot[]>(() => {
    const legs = this.legs() ?? [];
    const picked = this.selected();
    return legs.flatMap((leg) => {
      const on = picked === leg.id;
      const colour = riskColour[leg.risk];
      const path = greatCirclePath(leg.from, leg.to, SEGMENTS);
      const title = `${leg.reference}: ${leg.from.name} → ${leg.to.name}, ${riskLabels[leg.risk].toLowerCase()}`;
      const line = path.slice(1, -1).map((position, i) => ({
        key: `${leg.id}-${i}`,
        position,
        title,
        content: this.dot(colour, on ? 7 : 5),
        zIndex: on ? 20 : leg.risk === 'on_time' ? 1 : 5,
      }));
      return [
        ...line,
        {
          key: `${leg.id}-from`,
          position: path[0]!,
          title: `${leg.from.name} (${leg.direction === 'outbound' ? 'depot' : 'campus'})`,
          content: this.end(colour, leg.direction === 'outbound' ? 'square' : 'round'),
          zIndex: 30,
        },
        {
          key: `${leg.id}-to`,
          position: path[path.length - 1]!,
          title: `${leg.to.name} (${leg.direction === 'outbound' ? 'campus' : 'depot'})`,
          content: this.end(colour, leg.direction === 'outbound' ? 'round' : 'square'),
          zIndex: 30,
        },
      ];
    });
  });

  protected readonly counts = computed(() => {
    const c: Record<ShipmentRisk, number> = { on_time: 0, at_risk: 0, overdue: 0 };
    for (const l of this.legs() ?? []) c[l.risk] += 1;
    return c;
  });

  private map: google.maps.Map | null = null;

  constructor() {
    void this.maps.load().catch(() => undefined);
    this.reload();
  }

  protected reload(): void {
    this.error.set(null);
    this.legs.set(null);
    this.api.inTransit().subscribe({
      next: (r) => {
        this.total.set(r.total);
        this.legs.set(r.shipments);
        this.fit();
      },
      error: (err: unknown) => this.error.set(messageOf(err)),
    });
  }

  protected onMapReady(map: google.maps.Map): void {
    this.map = map;
    this.fit();
  }

  /** Shows one leg: drawn on top, the map fitted to its two ends. */
  protected show(leg: ShipmentMapEntry): void {
    this.selected.set(leg.id);
    this.fit([leg]);
  }

  private fit(legs = this.legs() ?? []): void {
    if (!this.map || legs.length === 0 || typeof google === 'undefined') return;
    const bounds = new google.maps.LatLngBounds();
    for (const l of legs) {
      bounds.extend(l.from);
      bounds.extend(l.to);
    }
    this.map.fitBounds(bounds, 48);
  }

  /** A small round dot (styles set through the CSSOM: allowed by the app's CSP). */
  private dot(colour: string, size: number): HTMLElement {
    const el = this.document.createElement('span');
    Object.assign(el.style, {
      display: 'block',
      width: `${size}px`,
      height: `${size}px`,
      borderRadius: '50%',
      background: colour,
      transform: `translateY(${size / 2}px)`,
    });
    el.setAttribute('aria-hidden', 'true');
    return el;
  }

  /** An end of a route: a square for a depot, a circle for a campus, outlined in white. */
  private end(colour: string, shape: 'square' | 'round'): HTMLElement {
    const el = this.dot(colour, 14);
    Object.assign(el.style, {
      borderRadius: shape === 'round' ? '50%' : '3px',
      border: '2px solid var(--mat-sys-surface)',
      boxShadow: '0 0 0 1px var(--mat-sys-outline)',
      transform: 'translateY(7px)',
    });
    return el;
  }
}
