import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { RouterLink } from '@angular/router';
import type { Hold, Unit, UnitPage, UnitStatus } from '@evalon/contracts';
import { unitSortFields } from '@evalon/contracts/values';
import {
  catchError,
  firstValueFrom,
  forkJoin,
  from,
  map,
  mergeMap,
  of,
  scan,
  startWith,
  throwError,
} from 'rxjs';
import { noLender } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { describeHold } from '../../shared/holds';
import { formatWindow, todayIn } from '../../shared/iso-date';
import { ListPage, ListPageParts, listQuery, listSource, listWords } from '../../shared/list-page';
import { PageHeader } from '../../shared/page-header/page-header';
import { PillTone, StatusPill } from '../../shared/status-pill/status-pill';
import { modelCategoryLabels, unitStatusLabels, unitStatuses } from '@evalon/contracts/values';
import { unitStatusIcons, unitStatusTones } from './unit-status';
import { LenderCatalogApi } from '../catalog/lender-catalog-api';
import { UnitDialog, UnitDialogData } from './unit-dialog';
import { UnitsApi } from './units-api';
import { activeLender } from '../../shared/active-lender';

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
  readonly statusTone: PillTone;
  readonly categoryLabel: string;
  readonly next: NextHold;
}

/** How many holds lookups run at once, so a large fleet does not flood the server. */
const holdLookups = 4;

/** The lender's units with filters; fleet managers add and change them, coordinators look. */
@Component({
  selector: 'ev-unit-list',
  imports: [
    EmptyState,
    ListPageParts,
    MatButtonModule,
    MatCardModule,
    MatChipsModule,
    MatFormFieldModule,
    MatIconModule,
    MatSelectModule,
    MatSortModule,
    MatTableModule,
    MatTooltipModule,
    PageHeader,
    RouterLink,
    StatusPill,
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

  protected readonly statuses = unitStatuses;
  protected readonly statusLabels = unitStatusLabels;
  protected readonly columns = ['serial', 'model', 'depot', 'status', 'next', 'actions'];

  protected readonly lender = activeLender();
  /** Whether the person may add and change units (fleet managers; coordinators only look). */
  protected readonly canEdit = computed(() => this.session.hasAnyRole(['fleet_manager']));

  /** Page, size, order, search words and the model, depot and status filters, in the URL. */
  protected readonly query = listQuery({
    sortFields: unitSortFields,
    defaultSort: { field: 'serial', dir: 'asc' },
    filters: ['modelId', 'depotId', 'status'],
  });
  protected readonly modelFilter = computed(() => idOrNull(this.query.request().filters.modelId));
  protected readonly depotFilter = computed(() => idOrNull(this.query.request().filters.depotId));
  protected readonly statusFilter = computed(
    () => (this.query.request().filters.status || null) as UnitStatus | null,
  );

  /** The lender's models and depots, for the filters and the unit dialog. */
  private readonly choices = rxResource({
    params: () => this.lender()?.id,
    stream: ({ params: lenderId }) =>
      forkJoin({
        models: this.catalog.models(lenderId),
        depots: this.catalog.depots(lenderId),
      }).pipe(
        map(({ models, depots }) => ({
          models: models
            .filter((m) => m.lenderId === lenderId)
            .sort((a, b) => a.name.localeCompare(b.name)),
          depots,
        })),
      ),
  });
  protected readonly models = computed(() =>
    this.choices.hasValue() ? this.choices.value().models : [],
  );
  protected readonly depots = computed(() =>
    this.choices.hasValue() ? this.choices.value().depots : [],
  );

  /** The page of units the URL asks for, each with its next hold once looked up. */
  protected readonly units = listSource({
    params: () => ({ lenderId: this.lender()?.id ?? null, request: this.query.request() }),
    load: ({ lenderId, request }) =>
      lenderId === null
        ? throwError(() => noLender('Switch to a lender organisation to see its units.'))
        : this.api.unitPage(lenderId, request),
    rows: (answer: UnitPage) => {
      const next = this.nextHolds.hasValue() ? this.nextHolds.value() : new Map();
      return answer.items.map((unit): UnitRow => ({
        unit,
        statusLabel: unitStatusLabels[unit.status],
        statusIcon: unitStatusIcons[unit.status],
        statusTone: unitStatusTones[unit.status],
        categoryLabel: modelCategoryLabels[unit.category],
        next: next.get(unit.id) ?? { state: 'loading' },
      }));
    },
    key: (row) => row.unit.id,
  });

  /** The list as its template's parts see it. */
  protected readonly list: ListPage = {
    query: this.query,
    source: this.units,
    words: listWords('unit', 'units'),
  };

  /**
   * Each unit's current or next hold, from today in its depot's calendar, for the units of the
   * page on screen; answers fill in as they arrive. A failed lookup shows as "none" rather than
   * failing the table: the unit page has the full calendar.
   */
  private readonly nextHolds = rxResource({
    params: () => this.units.answer()?.items,
    stream: ({ params: units }) =>
      from(units).pipe(
        mergeMap((unit) => this.lookUpNextHold(unit), holdLookups),
        scan(
          (found, [unitId, next]) => new Map(found).set(unitId, next),
          new Map<number, NextHold>(),
        ),
        startWith(new Map<number, NextHold>()),
      ),
  });

  protected readonly summary = computed(() => {
    const answer = this.units.answer();
    if (!answer) return '';
    const count = (status: UnitStatus) =>
      answer.statusCounts.find((c) => c.status === status)?.count ?? 0;
    const { total } = answer;
    const parts = [`${total} ${total === 1 ? 'unit' : 'units'}`];
    parts.push(`${count('active')} available`);
    if (count('maintenance')) parts.push(`${count('maintenance')} in maintenance`);
    if (count('retired')) parts.push(`${count('retired')} retired`);
    return parts.join(' · ');
  });

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
    this.units.reload();
    this.notifier.success(
      unit ? `Unit ${saved.serialNumber} is saved.` : `Unit ${saved.serialNumber} is added.`,
    );
  }

  private lookUpNextHold(unit: Unit) {
    const today = todayIn(unit.homeDepotTimeZone);
    return this.api.holds(unit.id, { from: today }).pipe(
      map((holds: Hold[]): [number, NextHold] => {
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
  }
}

/** A positive id from a query-string value, or null. */
function idOrNull(text: string): number | null {
  const id = Number(text);
  return Number.isInteger(id) && id > 0 ? id : null;
}
