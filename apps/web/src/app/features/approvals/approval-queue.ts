import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  signal,
  untracked,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { Router } from '@angular/router';
import type { Depot, Hold, Loan, Milestones } from '@evalon/contracts';
import { firstValueFrom } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { Cautions } from '../../shared/cautions/cautions';
import { confirmAction } from '../../shared/confirm-dialog/confirm-dialog';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { moneyText } from '../../shared/formats';
import { CalendarRange, HoldCalendar, monthOf } from '../../shared/hold-calendar/hold-calendar';
import { addDays, formatInstant, formatWindow, todayIn, windowLength } from '../../shared/iso-date';
import {
  MilestoneTimeline,
  TimelineSite,
} from '../../shared/milestone-timeline/milestone-timeline';
import { PageHeader } from '../../shared/page-header/page-header';
import { StatusPill } from '../../shared/status-pill/status-pill';
import { LenderCatalogApi } from '../catalog/lender-catalog-api';
import { UnitsApi } from '../units/units-api';
import { describeHold } from '../../shared/holds';
import { ApprovalsApi } from './approvals-api';
import { DeclineDialog, DeclineDialogData } from './decline-dialog';
import { LoadError, LoadingBar } from '../../shared/list-page';
import { activeLender } from '../../shared/active-lender';

/** A waiting request with what the list shows already worked out. */
export interface RequestRow {
  readonly loan: Loan;
  readonly equipment: string;
  readonly caseDays: string;
  readonly requestedOn: string;
  readonly deposit: string;
}

/** One unit of the selected request: its footprint against the unit's other holds. */
export interface UnitFootprint {
  readonly unitId: number;
  readonly title: string;
  readonly depotName: string;
  /** This unit's own milestones (units of one loan may ship from different depots). */
  readonly milestones: Milestones;
  /** The unit's depot for the timeline's depot days, when the depot list has it. */
  readonly depot: TimelineSite | null;
  readonly footprint: CalendarRange;
  readonly footprintText: string;
  /** The unit's holds apart from this request's own. */
  readonly otherHolds: readonly Hold[];
  /** Other holds that overlap the footprint (the server should never let this happen). */
  readonly clashes: readonly Hold[];
  /** Other holds within {@link nearbyDays} days of the footprint, listed beside the calendar. */
  readonly nearbyHolds: readonly Hold[];
  readonly loading: boolean;
  readonly error: string | null;
}

/** How far around a footprint the list beside the calendar looks for other holds. */
const nearbyDays = 60;

/** "2 × Model A, Model B": the models of a loan, counted. */
export function equipmentOf(loan: Loan): string {
  const counts = new Map<string, number>();
  for (const unit of loan.units) counts.set(unit.modelName, (counts.get(unit.modelName) ?? 0) + 1);
  return [...counts].map(([name, n]) => (n > 1 ? `${n} × ${name}` : name)).join(', ');
}

/**
 * The fleet manager's queue of loan requests: the waiting requests on the left; beside them the
 * selected one's milestones and, per unit, a month calendar with the requested footprint
 * outlined against the unit's other holds; approve (after confirmation) or decline (with a
 * reason).
 */
@Component({
  selector: 'ev-approval-queue',
  imports: [
    LoadError,
    LoadingBar,
    Cautions,
    EmptyState,
    HoldCalendar,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MilestoneTimeline,
    PageHeader,
    StatusPill,
  ],
  templateUrl: './approval-queue.html',
  styleUrl: './approval-queue.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ApprovalQueue {
  private readonly api = inject(ApprovalsApi);
  private readonly units = inject(UnitsApi);
  private readonly catalog = inject(LenderCatalogApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly router = inject(Router);

  /** `?loan=` from the address: the request shown beside the list. */
  readonly loan = input<string | undefined>(undefined);

  protected readonly lender = activeLender();

  private readonly loans = signal<Loan[]>([]);
  private readonly depots = signal<Depot[]>([]);
  protected readonly loading = signal(false);
  protected readonly loaded = signal(false);
  protected readonly loadError = signal<string | null>(null);
  /** The loan being approved or declined right now. */
  protected readonly acting = signal<number | null>(null);
  /** Holds of each unit of the selected request, by unit id (undefined while loading). */
  private readonly unitHolds = signal<ReadonlyMap<number, Hold[] | string>>(new Map());
  /** The month each unit's calendar shows, by unit id. */
  private readonly months = signal<ReadonlyMap<number, string>>(new Map());

  protected readonly rows = computed<RequestRow[]>(() => {
    const zone = this.session.timeZone();
    return this.loans().map((loan) => ({
      loan,
      equipment: equipmentOf(loan),
      caseDays: formatWindow(loan.useFrom, loan.useTo),
      requestedOn: formatInstant(loan.createdAt, zone),
      deposit: moneyText(loan.deposit),
    }));
  });

  /** The request shown: the one in the address, else the one waiting longest. */
  protected readonly selected = computed<RequestRow | null>(() => {
    const rows = this.rows();
    const wanted = Number(this.loan());
    return rows.find((r) => r.loan.id === wanted) ?? rows[0] ?? null;
  });

  protected readonly campus = computed(() => {
    const loan = this.selected()?.loan;
    return loan ? { name: loan.siteName, timeZone: loan.siteTimeZone } : null;
  });

  /** The loan's whole footprint: earliest ship-by to latest ready-again. */
  protected readonly heldWindow = computed(() => {
    const loan = this.selected()?.loan;
    return loan ? formatWindow(loan.milestones.shipBy, loan.milestones.readyAgain) : '';
  });

  protected readonly useDays = computed(() => {
    const loan = this.selected()?.loan;
    return loan ? windowLength(loan.useFrom, loan.useTo) : 0;
  });

  protected readonly footprints = computed<UnitFootprint[]>(() => {
    const loan = this.selected()?.loan;
    if (!loan) return [];
    const holds = this.unitHolds();
    const depots = this.depots();
    return loan.units.map((unit) => {
      const depot = depots.find((d) => d.id === unit.depotId);
      const { shipBy, readyAgain } = unit.milestones;
      const loaded = holds.get(unit.unitId);
      const others = Array.isArray(loaded) ? loaded.filter((h) => h.loanId !== loan.id) : [];
      return {
        unitId: unit.unitId,
        title: `${unit.modelName} · ${unit.serialNumber}`,
        depotName: unit.depotName,
        milestones: unit.milestones,
        depot: depot ? { name: depot.name, timeZone: depot.timeZone } : null,
        footprint: { start: shipBy, end: readyAgain, label: 'This request' },
        footprintText: `${formatWindow(shipBy, readyAgain)} (${windowLength(shipBy, readyAgain)} days)`,
        otherHolds: others,
        clashes: others.filter((h) => h.start <= readyAgain && shipBy <= h.end),
        nearbyHolds: others
          .filter(
            (h) =>
              h.start <= addDays(readyAgain, nearbyDays) && addDays(shipBy, -nearbyDays) <= h.end,
          )
          .sort((a, b) => a.start.localeCompare(b.start)),
        loading: loaded === undefined,
        error: typeof loaded === 'string' ? loaded : null,
      };
    });
  });

  constructor() {
    effect(() => {
      const lender = this.lender();
      untracked(() => void this.load(lender?.id ?? null));
    });
    effect(() => {
      const loan = this.selected()?.loan ?? null;
      untracked(() => {
        // Each request opens its calendars on its own first case.
        this.months.set(new Map());
        this.loadHolds(loan);
      });
    });
  }

  protected select(row: RequestRow): void {
    void this.router.navigate([], {
      queryParams: { loan: row.loan.id },
      replaceUrl: true,
    });
  }

  protected isSelected(row: RequestRow): boolean {
    return this.selected()?.loan.id === row.loan.id;
  }

  /** The month a unit's calendar shows: chosen by the person, else that of the first case. */
  protected monthFor(unitId: number): string {
    const unit = this.selected()?.loan.units.find((u) => u.unitId === unitId);
    return this.months().get(unitId) ?? monthOf(unit?.milestones.useFrom ?? todayIn());
  }

  protected setMonth(unitId: number, month: string): void {
    this.months.update((months) => new Map(months).set(unitId, month));
  }

  protected describe(hold: Hold): string {
    return `${formatWindow(hold.start, hold.end)}: ${describeHold(hold)}`;
  }

  protected reload(): void {
    void this.load(this.lender()?.id ?? null);
  }

  protected async approve(row: RequestRow): Promise<void> {
    const { loan } = row;
    const confirmed = await firstValueFrom(
      confirmAction(this.dialog, {
        title: `Approve ${loan.reference}?`,
        message:
          `${loan.hospitalName} is asked to secure the deposit of ${row.deposit} ` +
          `(an estimate until you confirm the loan). The units stay held ${formatWindow(
            loan.milestones.shipBy,
            loan.milestones.readyAgain,
          )}.`,
        confirmLabel: 'Approve',
      }),
    );
    if (!confirmed) return;
    this.acting.set(loan.id);
    try {
      await firstValueFrom(this.api.approve(loan.id));
      this.removeFromQueue(loan.id);
      this.notifier.success(
        `${loan.reference} approved. ${loan.hospitalName} is asked for the deposit.`,
      );
    } catch (error) {
      this.notifier.error(error);
      // Someone else may have acted on it (or the hospital cancelled): show the queue as it is.
      if (error instanceof ApiError && (error.status === 409 || error.status === 404))
        this.reload();
    } finally {
      this.acting.set(null);
    }
  }

  protected async decline(row: RequestRow): Promise<void> {
    const declined = await firstValueFrom(
      this.dialog
        .open<DeclineDialog, DeclineDialogData, Loan>(DeclineDialog, {
          data: { loan: row.loan },
          width: '520px',
          maxWidth: 'calc(100vw - 32px)',
        })
        .afterClosed(),
    );
    if (!declined) return;
    this.removeFromQueue(row.loan.id);
    this.notifier.success(
      `${row.loan.reference} declined. ${row.loan.hospitalName} has been told.`,
    );
  }

  /** Takes a handled request off the list and shows the next one (the oldest left). */
  private removeFromQueue(loanId: number): void {
    this.loans.update((loans) => loans.filter((l) => l.id !== loanId));
    // A declined request releases its holds, so other requests' calendars are read again.
    this.unitHolds.set(new Map());
    const next = this.rows()[0];
    void this.router.navigate([], {
      queryParams: { loan: next ? next.loan.id : null },
      replaceUrl: true,
    });
  }

  private async load(lenderId: number | null): Promise<void> {
    if (lenderId === null) {
      this.loadError.set('Switch to a lender organisation to see its loan requests.');
      return;
    }
    this.loading.set(true);
    this.loadError.set(null);
    try {
      const [loans, depots] = await Promise.all([
        firstValueFrom(this.api.waiting()),
        firstValueFrom(this.catalog.depots(lenderId)).catch(() => [] as Depot[]),
      ]);
      if (lenderId !== this.lender()?.id) return;
      // Only this lender's (a person may work for several), the longest waiting first.
      this.loans.set(
        loans
          .filter((l) => l.lenderId === lenderId && l.state === 'requested')
          .sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id),
      );
      this.depots.set(depots);
      this.unitHolds.set(new Map());
      this.loaded.set(true);
    } catch (error) {
      if (lenderId === this.lender()?.id) this.loadError.set(messageOf(error));
    } finally {
      if (lenderId === this.lender()?.id) this.loading.set(false);
    }
  }

  /** Loads every unit's holds for the selected request (once per unit while the page is open). */
  private loadHolds(loan: Loan | null): void {
    if (!loan) return;
    for (const unit of loan.units) {
      const known = this.unitHolds().get(unit.unitId);
      if (Array.isArray(known)) continue;
      this.units.holds(unit.unitId).subscribe({
        next: (holds) => this.unitHolds.update((map) => new Map(map).set(unit.unitId, holds)),
        error: (error: unknown) =>
          this.unitHolds.update((map) => new Map(map).set(unit.unitId, messageOf(error))),
      });
    }
  }
}
