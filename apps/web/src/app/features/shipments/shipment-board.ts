import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule, type Sort } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import {
  shipmentStateLabels,
  shipmentStates,
  type ShipmentList,
  type ShipmentState,
  type ShipmentSummary,
} from '@evalon/contracts';
import { catchError, forkJoin, map, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe } from '../../shared/formats';
import { PageHeader } from '../../shared/page-header/page-header';
import { ShipmentApi, type ShipmentFilter } from './shipment-api';

/** The board's work queues: what a coordinator does today. */
const queues = [
  {
    key: 'pack',
    label: 'To pack',
    icon: 'inventory',
    filter: { direction: 'outbound', state: 'to_pack' },
  },
  {
    key: 'hand',
    label: 'To hand over',
    icon: 'local_shipping',
    filter: { direction: 'outbound', state: 'packed' },
  },
  {
    key: 'back',
    label: 'Arriving back',
    icon: 'u_turn_left',
    filter: { direction: 'return', state: 'in_transit' },
  },
  {
    key: 'inspect',
    label: 'To inspect',
    icon: 'fact_check',
    filter: { direction: 'return', state: 'received' },
  },
] as const;

/**
 * `/shipments`: every leg the person may see, filtered, sorted and paged on the server, with
 * today's work queues on top (each a count and a one-click filter).
 */
@Component({
  selector: 'ev-shipment-board',
  imports: [
    DayPipe,
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './shipment-board.html',
  styleUrl: './shipment-board.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ShipmentBoard {
  private readonly api = inject(ShipmentApi);
  private readonly session = inject(SessionStore);
  /** Lender people (and the admin) have the map of legs in transit. */
  protected readonly hasMap = computed(() =>
    this.session.hasAnyRole(['coordinator', 'fleet_manager', 'admin']),
  );

  protected readonly states = shipmentStates;
  protected readonly stateLabels = shipmentStateLabels;
  protected readonly queues = queues;
  protected readonly columns = [
    'reference',
    'direction',
    'route',
    'state',
    'due',
    'eta',
    'risk',
    'items',
  ];

  protected readonly filter = signal<ShipmentFilter>({ sort: 'due', page: 1, pageSize: 25 });
  protected readonly page = signal<ShipmentList | null>(null);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly counts = signal<Partial<Record<string, number>>>({});
  /** Depots seen on the board, for the depot filter. */
  protected readonly depots = signal<{ id: number; name: string }[]>([]);
  protected readonly rows = computed(() => this.page()?.shipments ?? []);

  constructor() {
    toObservable(this.filter)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap((f) =>
          this.api.list(f).pipe(
            catchError((err: unknown) => {
              this.error.set(messageOf(err));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((list) => {
        this.loading.set(false);
        if (!list) return;
        this.error.set(null);
        this.page.set(list);
        const seen = new Map(this.depots().map((d) => [d.id, d.name]));
        for (const s of list.shipments) seen.set(s.depotId, s.depotName);
        this.depots.set([...seen].map(([id, name]) => ({ id, name })));
      });
    forkJoin(
      queues.map((q) =>
        this.api.list({ ...q.filter, pageSize: 1 } as ShipmentFilter).pipe(
          map((r) => [q.key, r.total] as const),
          catchError(() => of([q.key, 0] as const)),
        ),
      ),
    )
      .pipe(takeUntilDestroyed())
      .subscribe((pairs) => this.counts.set(Object.fromEntries(pairs)));
  }

  protected set(patch: Partial<ShipmentFilter>): void {
    this.filter.update((f) => ({ ...f, ...patch, page: 1 }));
  }

  protected showQueue(q: (typeof queues)[number]): void {
    this.filter.update((f) => ({
      ...f,
      direction: q.filter.direction,
      state: q.filter.state as ShipmentState,
      risk: null,
      page: 1,
    }));
  }

  protected clear(): void {
    this.filter.set({ sort: 'due', page: 1, pageSize: this.filter().pageSize });
  }

  protected sort(s: Sort): void {
    const key =
      s.active === 'due'
        ? 'due'
        : s.active === 'reference'
          ? 'reference'
          : s.active === 'state'
            ? 'state'
            : 'updated';
    this.set({
      sort: s.direction === 'desc' && (key === 'due' || key === 'updated') ? `-${key}` : key,
    });
  }

  protected paginate(e: PageEvent): void {
    this.filter.update((f) => ({ ...f, page: e.pageIndex + 1, pageSize: e.pageSize }));
  }

  protected label(s: ShipmentSummary): string {
    return shipmentStateLabels[s.state];
  }

  protected riskLabel(s: ShipmentSummary): string {
    return s.risk === 'overdue' ? 'Overdue' : s.risk === 'at_risk' ? 'At risk' : 'On time';
  }
}
