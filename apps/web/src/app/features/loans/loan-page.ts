import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  input,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import type { Loan, LoanEvent, LoanState, Site } from '@evalon/contracts';
import { catchError, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { CatalogApi } from '../../shared/catalog-api';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe, MoneyPipe, WindowPipe } from '../../shared/formats';
import { formatInstant, todayIn } from '../../shared/iso-date';
import { loanStateLabels, stoppedLoanStates } from '../../shared/loan-rules';
import { LoanStateChip } from '../../shared/loan-state-chip';
import {
  MilestoneTimeline,
  TimelineSite,
  loanProgress,
} from '../../shared/milestone-timeline/milestone-timeline';
import { PageHeader } from '../../shared/page-header/page-header';
import { CancelDialog, CancelDialogData } from './cancel-dialog';
import { LoanApi } from './loan-api';

/** One line of the loan's history, ready to show. */
interface HistoryEntry {
  readonly event: LoanEvent;
  readonly who: string;
  readonly when: string;
  readonly change: string;
}

/** What happens next, in plain words, by state. */
export function nextStepText(loan: Loan): string {
  const lender = loan.lenderName;
  const texts: Record<LoanState, string> = {
    requested: `Waiting for ${lender} to approve the request. Nothing ships until they do.`,
    approved: `${lender} approved the loan. The deposit is due before they confirm and ship.`,
    confirmed: `Confirmed. ${lender} ships by the first date below.`,
    shipped:
      'On its way to your campus. Receiving, inspection and sterile processing follow arrival.',
    delivered: 'At your campus. Send it back by the “Ships back by” day after decontamination.',
    returning: `On its way back to ${lender}’s depot.`,
    returned: `Back at the depot. ${lender} inspects it and settles the deposit.`,
    closed: 'Closed: the unit is back and the deposit is settled.',
    declined: `${lender} declined this request. The units were freed; you can request other dates or units.`,
    cancelled: 'Cancelled. The units were freed for other hospitals.',
    expired: 'Expired before it was confirmed. The units were freed.',
  };
  return texts[loan.state];
}

/**
 * One loan: its state, the milestones from shipping to ready-again in the campus calendar, the
 * units, the deposit estimate and the history; buyers may cancel while it is requested or
 * approved.
 */
@Component({
  selector: 'ev-loan-page',
  imports: [
    Cautions,
    DayPipe,
    EmptyState,
    LoanStateChip,
    MatButtonModule,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MilestoneTimeline,
    MoneyPipe,
    PageHeader,
    RouterLink,
    WindowPipe,
  ],
  templateUrl: './loan-page.html',
  styleUrl: './loan-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanPage {
  private readonly api = inject(LoanApi);
  private readonly catalog = inject(CatalogApi);
  private readonly session = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly locale = inject(LOCALE_ID);

  /** `:id` from the path. */
  readonly id = input.required<string>();

  protected readonly loan = signal<Loan | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  private readonly sites = signal<Site[]>([]);
  private readonly attempt = signal(0);

  /** Whether the person may open unit pages (Find equipment is for buyers). */
  protected readonly canBrowse = computed(() => this.session.hasAnyRole(['buyer']));
  /** Whether the server lets this person cancel the loan now. */
  protected readonly canCancel = computed(
    () => this.loan()?.allowedActions?.includes('cancel') ?? false,
  );
  protected readonly stopped = computed(() => {
    const loan = this.loan();
    return loan ? stoppedLoanStates.includes(loan.state) : false;
  });

  protected readonly campus = computed<TimelineSite | null>(() => {
    const loan = this.loan();
    return loan ? { name: loan.siteName, timeZone: loan.siteTimeZone } : null;
  });
  /** The depot, when all units come from one (its zone from the sites list). */
  protected readonly depot = computed<TimelineSite | null>(() => {
    const loan = this.loan();
    const ids = new Set(loan?.units.map((u) => u.depotId));
    if (!loan || ids.size !== 1) return null;
    const unit = loan.units[0]!;
    const site = this.sites().find((s) => s.id === unit.depotId);
    return site ? { name: site.name, timeZone: site.timeZone } : null;
  });
  protected readonly progress = computed(() => {
    const loan = this.loan();
    return loan
      ? loanProgress(loan.state, loan.milestones, todayIn(loan.siteTimeZone))
      : { current: null, complete: false };
  });
  protected readonly nextStep = computed(() => {
    const loan = this.loan();
    return loan ? nextStepText(loan) : '';
  });

  protected readonly history = computed<HistoryEntry[]>(() => {
    const zone = this.session.timeZone();
    const events = [...(this.loan()?.events ?? [])].sort(
      (a, b) => b.at.localeCompare(a.at) || b.id - a.id,
    );
    return events.map((event) => ({
      event,
      who: event.actorName ?? 'Evalon',
      when: formatInstant(event.at, zone, this.locale),
      change: event.fromState
        ? `${loanStateLabels[event.fromState]} → ${loanStateLabels[event.toState]}`
        : `Request sent → ${loanStateLabels[event.toState]}`,
    }));
  });
  protected readonly viewerZone = computed(() => this.session.timeZone());

  constructor() {
    this.catalog
      .sites()
      .pipe(takeUntilDestroyed())
      .subscribe({ next: (sites) => this.sites.set(sites), error: () => this.sites.set([]) });

    toObservable(computed(() => ({ id: Number(this.id()), attempt: this.attempt() })))
      .pipe(
        tap(() => {
          this.loading.set(true);
          this.loadError.set(null);
        }),
        switchMap(({ id }) =>
          this.api.get(id).pipe(
            catchError((error: unknown) => {
              this.loadError.set(messageOf(error));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((loan) => {
        this.loan.set(loan);
        this.loading.set(false);
      });
  }

  protected retry(): void {
    this.attempt.update((n) => n + 1);
  }

  protected cancel(): void {
    const loan = this.loan();
    if (!loan) return;
    this.dialog
      .open<CancelDialog, CancelDialogData, Loan>(CancelDialog, {
        data: { loan },
        width: '520px',
        maxWidth: 'calc(100vw - 32px)',
        role: 'alertdialog',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((updated) => {
        if (!updated) return;
        // The cancel answer may leave out the history; keep what we had and add to it by reloading.
        this.loan.set(updated);
        this.notifier.success(`${updated.reference} is cancelled. The lender has been told.`);
        this.retry();
      });
  }
}
