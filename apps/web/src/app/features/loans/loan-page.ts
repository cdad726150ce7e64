import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  OnInit,
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
import { Router, RouterLink } from '@angular/router';
import type { Loan, LoanEvent, LoanPayments, LoanState, Site } from '@evalon/contracts';
import { catchError, distinctUntilChanged, filter, map, of, switchMap, tap } from 'rxjs';
import { messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import { CatalogApi } from '../../shared/catalog-api';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe, MoneyPipe, WindowPipe } from '../../shared/formats';
import { formatInstant, todayIn } from '../../shared/iso-date';
import { loanStateLabels, stoppedLoanStates } from '@evalon/contracts/values';
import { LoanStateChip } from '../../shared/loan-state-chip';
import {
  MilestoneTimeline,
  TimelineSite,
  loanProgress,
} from '../../shared/milestone-timeline/milestone-timeline';
import { PageHeader } from '../../shared/page-header/page-header';
import { LoanEvidence } from '../evidence/loan-evidence';
import { LoanShipments } from '../shipments/loan-shipments';
import { CancelDialog, CancelDialogData } from './cancel-dialog';
import { DepositReturn, DepositSection } from './deposit-section';
import { LoanApi } from './loan-api';
import { LoanDocuments } from './loan-documents';
import { LoanPaymentsCard } from './loan-payments';
import { PaymentsApi } from './payments-api';

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
    DepositSection,
    EmptyState,
    LoanDocuments,
    LoanEvidence,
    LoanPaymentsCard,
    LoanShipments,
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
export class LoanPage implements OnInit {
  private readonly api = inject(LoanApi);
  private readonly paymentsApi = inject(PaymentsApi);
  private readonly router = inject(Router);
  private readonly catalog = inject(CatalogApi);
  private readonly sessionStore = inject(SessionStore);
  private readonly dialog = inject(MatDialog);
  private readonly notifier = inject(Notifier);
  private readonly locale = inject(LOCALE_ID);

  /** `:id` from the path. */
  readonly id = input.required<string>();
  /** `?deposit=success|cancelled`: how the payment provider's hosted page sent the buyer back. */
  readonly deposit = input<string | undefined>(undefined);
  /** `?session=cs_…`: the checkout session of a successful payment. */
  readonly session = input<string | undefined>(undefined);

  /** The return from the hosted page, read once when the page opens. */
  protected readonly depositReturn = signal<DepositReturn | null>(null);
  protected readonly payments = signal<LoanPayments | null>(null);
  protected readonly paymentsLoading = signal(false);
  protected readonly paymentsError = signal<string | null>(null);
  private readonly paymentsAttempt = signal(0);

  protected readonly loan = signal<Loan | null>(null);
  protected readonly loading = signal(true);
  protected readonly loadError = signal<string | null>(null);
  private readonly sites = signal<Site[]>([]);
  private readonly attempt = signal(0);

  /** Whether the person may open unit pages (Find equipment is for buyers). */
  protected readonly canBrowse = computed(() => this.sessionStore.hasAnyRole(['buyer']));
  /** Whether the person is a buyer of the loan's hospital (secures the deposit, files documents). */
  protected readonly isHospitalBuyer = computed(() => {
    const loan = this.loan();
    const user = this.sessionStore.user();
    return (
      !!loan &&
      !!user?.memberships.some((m) => m.organisationId === loan.hospitalId && m.role === 'buyer')
    );
  });
  /** Whether the person works at the loan's hospital (else: the lender, or the admin). */
  protected readonly onHospitalSide = computed(() => {
    const loan = this.loan();
    const active = this.sessionStore.activeOrganisation();
    return !loan || active?.id === loan.hospitalId;
  });
  /** Where "back" goes: the loans list for hospital people, Home for everyone else. */
  protected readonly back = computed(() =>
    this.onHospitalSide() ? { link: '/loans', label: 'All loans' } : { link: '/', label: 'Home' },
  );
  /** Whether the "Secure the deposit" section (or the outcome of a payment) shows. */
  protected readonly showDeposit = computed(() => {
    const loan = this.loan();
    if (!loan) return false;
    return (this.isHospitalBuyer() && loan.state === 'approved') || this.depositReturn() !== null;
  });
  /**
   * Whether the payments card shows: once the loan is past the request (or money moved), except
   * while the buyer's "Secure the deposit" section already says everything about it.
   */
  protected readonly showPaymentsCard = computed(() => {
    const loan = this.loan();
    if (!loan) return false;
    const moved = (this.payments()?.payments.length ?? 0) > 0;
    if (loan.state === 'requested') return moved;
    return !(this.showDeposit() && loan.state === 'approved' && !moved);
  });
  /** Whether the buyer may still file documents (the server refuses stopped loans). */
  protected readonly canUpload = computed(() => this.isHospitalBuyer() && !this.stopped());
  /** IANA zone of each depot, for the deposit strategy estimate. */
  protected readonly depotZones = computed(
    () => new Map(this.sites().map((s) => [s.id, s.timeZone] as const)),
  );
  /**
   * Query parameters of "Ask for a proctor" on a confirmed (or later, live) loan: its campus,
   * first model and case days prefill the visit request; null when a proctor cannot be asked.
   */
  protected readonly proctorRequest = computed(() => {
    const loan = this.loan();
    const user = this.sessionStore.user();
    const hospitalPerson = user?.memberships.some(
      (m) =>
        m.organisationId === loan?.hospitalId && (m.role === 'buyer' || m.role === 'clinician'),
    );
    if (!loan || !hospitalPerson || !['confirmed', 'shipped', 'delivered'].includes(loan.state)) {
      return null;
    }
    return {
      loanId: loan.id,
      siteId: loan.siteId,
      modelId: loan.units[0]?.modelId,
      from: loan.useFrom,
      to: loan.useTo,
    };
  });
  /** Whether the server lets this person cancel the loan now. */
  protected readonly canCancel = computed(
    () => this.loan()?.allowedActions?.includes('cancel') ?? false,
  );
  /**
   * Whether the evaluation cases show: for the hospital's people and the admin, once the
   * platform was delivered (the lender does not see case records).
   */
  protected readonly showEvidence = computed(() => {
    const loan = this.loan();
    if (!loan || !['delivered', 'returning', 'returned', 'closed'].includes(loan.state)) {
      return false;
    }
    const user = this.sessionStore.user();
    return !!user?.memberships.some(
      (m) =>
        m.role === 'admin' ||
        (m.organisationId === loan.hospitalId && (m.role === 'buyer' || m.role === 'clinician')),
    );
  });
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
    const zone = this.sessionStore.timeZone();
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
  protected readonly viewerZone = computed(() => this.sessionStore.timeZone());

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

    // Payments follow the loan: loaded once it is known, again when it changes state.
    toObservable(
      computed(() => {
        const loan = this.loan();
        return loan ? `${loan.id}:${loan.state}:${this.paymentsAttempt()}` : null;
      }),
    )
      .pipe(
        distinctUntilChanged(),
        filter((key): key is string => key !== null),
        map((key) => Number(key.split(':')[0])),
        tap(() => {
          this.paymentsLoading.set(true);
          this.paymentsError.set(null);
        }),
        switchMap((id) =>
          this.paymentsApi.payments(id).pipe(
            catchError((error: unknown) => {
              this.paymentsError.set(messageOf(error));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((payments) => {
        if (payments) this.payments.set(payments);
        this.paymentsLoading.set(false);
      });
  }

  ngOnInit(): void {
    const outcome = this.deposit();
    if (outcome !== 'success' && outcome !== 'cancelled') return;
    this.depositReturn.set({ outcome, sessionId: this.session() ?? null });
    // Take the outcome out of the address so a reload does not replay it.
    void this.router.navigate([], {
      queryParams: { deposit: null, session: null },
      queryParamsHandling: 'merge',
      replaceUrl: true,
    });
  }

  /** The deposit was secured (or the loan otherwise changed): reload the loan and payments. */
  protected depositChanged(): void {
    this.retry();
    this.paymentsAttempt.update((n) => n + 1);
  }

  protected retryPayments(): void {
    this.paymentsAttempt.update((n) => n + 1);
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
