import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  effect,
  inject,
  signal,
  untracked,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginator, MatPaginatorModule } from '@angular/material/paginator';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink } from '@angular/router';
import type { Depot, Hold, Model, Unit, UnitStatus } from '@evalon/contracts';
import { Subscription, catchError, firstValueFrom, from, map, mergeMap, of } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { formatWindow, todayIn } from '../../shared/iso-date';
import { PageHeader } from '../../shared/page-header/page-header';
import {
  modelCategoryLabels,
  unitStatusIcons,
  unitStatusLabels,
  unitStatuses,
} from '../catalog/catalog-rules';
import { LenderCatalogApi } from '../catalog/lender-catalog-api';
import { UnitDialog, UnitDialogData } from './unit-dialog';
import { UnitsApi } from './units-api';

/** The next hold of a unit: not looked up yet, none, or the hold. */
export type NextHold =
  | { readonly state: 'loading' }
  | { readonly state: 'none' }
  | {
      readonly state: 'hold';
      readonly hold: Hold;
      readonly when: string;
      readonly what: string;
      /** Whether the hold covers today. */
      readonly now: boolean;
    };

/** A unit with what the table shows already worked out. */
export interface UnitRow {
  readonly unit: Unit;
  readonly statusLabel: string;
  readonly statusIcon: string;
  readonly categoryLabel: string;
  readonly next: NextHold;
}

/** How many holds lookups run at once, so a large fleet does not flood the server. */
const holdLookups = 4;

/** Words for a hold in a table cell. */
export function describeHold(hold: Hold): string {
  if (hold.kind === 'maintenance') return `Maintenance${hold.reason ? `: ${hold.reason}` : ''}`;
  const parts = [hold.loanReference ? `Loan ${hold.loanReference}` : hold.label];
  if (hold.hospitalName) parts.push(hold.hospitalName);
  return parts.join(' · ');
}

/** The lender's units with filters; fleet managers add and change them, coordinators look. */
@Component({
  selector: 'ev-unit-list',
  imports: [
    EmptyState,
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatPaginatorModule,
    MatProgressBarModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './unit-list.html',
  styleUrl: './unit-list.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnitList {
  private readonly api = inject(UnitsApi);
  private readonly catalog = inject(LenderCatalogApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly router = inject(Router);

  protected readonly statuses = unitStatuses;
  protected readonly statusLabels = unitStatusLabels;
  protected readonly columns = ['serial', 'model', 'depot', 'status', 'next', 'actions'];

  protected readonly lender = computed(() => {
    const organisation = this.session.activeOrganisation();
    return organisation?.kind === 'lender' ? organisation : null;
  });
  /** Whether the person may add and change units (fleet managers; coordinators only look). */
  protected readonly canEdit = computed(() => this.session.hasAnyRole(['fleet_manager']));

  private readonly units = signal<Unit[]>([]);
  protected readonly models = signal<Model[]>([]);
  protected readonly depots = signal<Depot[]>([]);
  private readonly nextHolds = signal<ReadonlyMap<number, NextHold>>(new Map());
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);

  protected readonly filterText = signal('');
  protected readonly modelFilter = signal<number | null>(null);
  protected readonly depotFilter = signal<number | null>(null);
  protected readonly statusFilter = signal<UnitStatus | null>(null);
  /** Whether any filter hides units. */
  protected readonly filtered = computed(
    () =>
      !!this.filterText().trim() ||
      this.modelFilter() !== null ||
      this.depotFilter() !== null ||
      this.statusFilter() !== null,
  );

  protected readonly rows = computed<UnitRow[]>(() => {
    const next = this.nextHolds();
    return this.units().map((unit) => ({
      unit,
      statusLabel: unitStatusLabels[unit.status],
      statusIcon: unitStatusIcons[unit.status],
      categoryLabel: modelCategoryLabels[unit.category],
      next: next.get(unit.id) ?? { state: 'loading' },
    }));
  });

  protected readonly summary = computed(() => {
    const units = this.units();
    const count = (status: UnitStatus) => units.filter((u) => u.status === status).length;
    const parts = [`${units.length} ${units.length === 1 ? 'unit' : 'units'}`];
    parts.push(`${count('active')} available`);
    if (count('maintenance')) parts.push(`${count('maintenance')} in maintenance`);
    if (count('retired')) parts.push(`${count('retired')} retired`);
    return parts.join(' · ');
  });

  protected readonly dataSource = new MatTableDataSource<UnitRow>([]);
  private readonly sort = viewChild(MatSort);
  private readonly paginator = viewChild(MatPaginator);
  /** Hold lookups of the current load; replaced (and the old ones stopped) on reload. */
  private lookups = new Subscription();

  constructor() {
    inject(DestroyRef).onDestroy(() => this.lookups.unsubscribe());
    this.dataSource.filterPredicate = (row, raw) => {
      const filter = JSON.parse(raw) as {
        text: string;
        model: number | null;
        depot: number | null;
        status: UnitStatus | null;
      };
      if (filter.model !== null && row.unit.modelId !== filter.model) return false;
      if (filter.depot !== null && row.unit.homeDepotId !== filter.depot) return false;
      if (filter.status !== null && row.unit.status !== filter.status) return false;
      if (!filter.text) return true;
      return [
        row.unit.serialNumber,
        row.unit.udiDi ?? '',
        row.unit.modelName,
        row.unit.homeDepotName,
      ]
        .join(' ')
        .toLowerCase()
        .includes(filter.text);
    };
    this.dataSource.sortingDataAccessor = (row, column) => {
      switch (column) {
        case 'model':
          return row.unit.modelName.toLocaleLowerCase();
        case 'depot':
          return row.unit.homeDepotName.toLocaleLowerCase();
        case 'status':
          return unitStatuses.indexOf(row.unit.status);
        case 'next':
          // Units without a coming hold sort last.
          return row.next.state === 'hold' ? row.next.hold.start : '9999-12-31';
        default:
          return row.unit.serialNumber.toLocaleLowerCase();
      }
    };

    effect(() => {
      const lender = this.lender();
      untracked(() => void this.load(lender?.id ?? null));
    });
    effect(() => {
      this.dataSource.data = this.rows();
    });
    effect(() => {
      this.dataSource.filter = JSON.stringify({
        text: this.filterText().trim().toLowerCase(),
        model: this.modelFilter(),
        depot: this.depotFilter(),
        status: this.statusFilter(),
      });
      untracked(() => this.paginator()?.firstPage());
    });
    effect(() => {
      this.dataSource.sort = this.sort() ?? null;
      this.dataSource.paginator = this.paginator() ?? null;
    });
  }

  protected setFilter(event: Event): void {
    this.filterText.set((event.target as HTMLInputElement).value);
  }

  protected clearFilters(): void {
    this.filterText.set('');
    this.modelFilter.set(null);
    this.depotFilter.set(null);
    this.statusFilter.set(null);
  }

  protected reload(): void {
    void this.load(this.lender()?.id ?? null);
  }

  protected open(row: UnitRow): void {
    void this.router.navigate(['/units', row.unit.id]);
  }

  /** Opens the unit dialog: a new unit, or a change to `unit`. */
  protected async edit(unit?: Unit): Promise<void> {
    const data: UnitDialogData = {
      unit,
      models: this.models().map((m) => ({ id: m.id, name: m.name })),
      depots: this.depots().map((d) => ({ id: d.id, name: d.name })),
      modelId: this.modelFilter(),
    };
    const saved = await firstValueFrom(
      this.dialog
        .open<UnitDialog, UnitDialogData, Unit>(UnitDialog, {
          data,
          width: '520px',
          maxWidth: 'calc(100vw - 32px)',
        })
        .afterClosed(),
    );
    if (!saved) return;
    this.units.update((list) => [...list.filter((u) => u.id !== saved.id), saved]);
    if (!unit) this.lookUpNextHolds([saved]);
    this.notifier.success(
      unit ? `Unit ${saved.serialNumber} is saved.` : `Unit ${saved.serialNumber} is added.`,
    );
  }

  private async load(lenderId: number | null): Promise<void> {
    if (lenderId === null) {
      this.loadError.set('Switch to a lender organisation to see its units.');
      return;
    }
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const [units, models, depots] = await Promise.all([
        firstValueFrom(this.api.units(lenderId)),
        firstValueFrom(this.catalog.models(lenderId)),
        firstValueFrom(this.catalog.depots(lenderId)),
      ]);
      if (lenderId !== this.lender()?.id) return;
      this.units.set(units.filter((u) => u.lenderId === lenderId));
      this.models.set(
        models.filter((m) => m.lenderId === lenderId).sort((a, b) => a.name.localeCompare(b.name)),
      );
      this.depots.set(depots);
      this.loaded.set(true);
      this.nextHolds.set(new Map());
      this.lookups.unsubscribe();
      this.lookups = new Subscription();
      this.lookUpNextHolds(this.units());
    } catch (error) {
      if (lenderId === this.lender()?.id) this.loadError.set(messageOf(error));
    } finally {
      if (lenderId === this.lender()?.id) this.loading.set(false);
    }
  }

  /**
   * Finds each unit's current or next hold, from today in its depot's calendar. A failed lookup
   * shows as "none" rather than failing the table: the unit page has the full calendar.
   */
  private lookUpNextHolds(units: readonly Unit[]): void {
    const lookup = from(units)
      .pipe(
        mergeMap((unit) => {
          const today = todayIn(unit.homeDepotTimeZone);
          return this.api.holds(unit.id, { from: today }).pipe(
            map((holds): [number, NextHold] => {
              const hold = holds
                .filter((h) => h.end >= today)
                .sort((a, b) => a.start.localeCompare(b.start))[0];
              return [
                unit.id,
                hold
                  ? {
                      state: 'hold',
                      hold,
                      when: formatWindow(hold.start, hold.end),
                      what: describeHold(hold),
                      now: hold.start <= today,
                    }
                  : { state: 'none' },
              ];
            }),
            catchError(() => of<[number, NextHold]>([unit.id, { state: 'none' }])),
          );
        }, holdLookups),
      )
      .subscribe(([unitId, next]) => {
        this.nextHolds.update((current) => new Map(current).set(unitId, next));
      });
    this.lookups.add(lookup);
  }
}
