import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  InjectionToken,
  LOCALE_ID,
  OnInit,
  computed,
  inject,
  input,
  output,
  signal,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { FormControl, FormGroup, ReactiveFormsModule, ValidationErrors } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';
import type {
  DepositRequest,
  DepositResponse,
  DepositStrategyName,
  Loan,
  LoanPayments,
  LoanState,
} from '@evalon/contracts';
import { chooseStrategy } from '@evalon/deposits';
import { DateTime } from 'luxon';
import {
  Observable,
  Subscription,
  catchError,
  filter,
  interval,
  map,
  of,
  switchMap,
  take,
  takeUntil,
  tap,
  timer,
} from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { SessionStore } from '../../core/session-store';
import {
  depositCaution,
  depositStrategyLabels,
  purchaseOrderProblem,
  purchaseOrderRule,
} from '@evalon/contracts/values';
import { depositStrategyExplanations } from '../../shared/deposit-rules';
import { ExternalNavigation } from '../../shared/external-navigation';
import { MoneyPipe } from '../../shared/formats';
import { formatInstant } from '../../shared/iso-date';
import { dueIn } from '../../shared/relative-time';
import { LoanApi } from './loan-api';
import { PaymentsApi } from './payments-api';

/** How the buyer came back from the payment provider's hosted page (the query parameters). */
export interface DepositReturn {
  readonly outcome: 'success' | 'cancelled';
  /** The checkout session id from `?session=`, when the page sent one. */
  readonly sessionId: string | null;
}

/** How often, and how long, the page looks for the confirmation after a successful payment. */
export interface ConfirmationPolling {
  readonly intervalMs: number;
  readonly timeoutMs: number;
}

/**
 * Polling after the hosted page: every 2 s for at most 20 s. The server checks the provider on
 * `refresh` and the webhook usually lands within a second or two; after 20 s the buyer is told
 * the payment is still processing and that a notification will follow (product choice).
 */
export const CONFIRMATION_POLLING = new InjectionToken<ConfirmationPolling>(
  'CONFIRMATION_POLLING',
  { providedIn: 'root', factory: () => ({ intervalMs: 2000, timeoutMs: 20_000 }) },
);

/**
 * Where things stand after the buyer came back from the hosted page: confirming, confirmed,
 * still processing after the polling time, cancelled on the hosted page, or the loan stopped
 * (expired or cancelled) before the payment could confirm it.
 */
type ReturnPhase = 'confirming' | 'confirmed' | 'slow' | 'cancelled' | 'stopped';

/** States a loan is in once its deposit is secured. */
const securedStates: readonly LoanState[] = [
  'confirmed',
  'shipped',
  'delivered',
  'returning',
  'returned',
  'closed',
];

/**
 * The card strategy the server will most likely choose, before it has chosen: the loan's
 * footprint (start of the earliest ship-by day to the end of the latest ready-again day, each in
 * its depot's zone, as the server reads it) through `chooseStrategy` of @evalon/deposits. Null
 * when it cannot be worked out (e.g. the footprint has ended).
 */
export function estimatedCardStrategy(
  loan: Pick<Loan, 'units' | 'siteTimeZone'>,
  depotZones: ReadonlyMap<number, string>,
  now: Date,
): DepositStrategyName | null {
  if (!loan.units.length) return null;
  let start = Infinity;
  let end = -Infinity;
  for (const unit of loan.units) {
    const zone = depotZones.get(unit.depotId) ?? loan.siteTimeZone;
    const ship = DateTime.fromISO(unit.milestones.shipBy, { zone }).startOf('day');
    const ready = DateTime.fromISO(unit.milestones.readyAgain, { zone })
      .plus({ days: 1 })
      .startOf('day');
    if (!ship.isValid || !ready.isValid) return null;
    start = Math.min(start, ship.toMillis());
    end = Math.max(end, ready.toMillis());
  }
  try {
    return chooseStrategy({ footprintStart: new Date(start), footprintEnd: new Date(end), now });
  } catch {
    return null;
  }
}

/**
 * "Secure the deposit" for the hospital's buyer while the loan is approved: the amount, the
 * deadline in the viewer's zone, how the card payment works, and the two ways to secure it: by
 * card on the payment provider's hosted page, or with a purchase order under the hospital's
 * credit agreement. Also the outcome when the buyer comes back from the hosted page.
 */
@Component({
  selector: 'ev-deposit-section',
  imports: [
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressSpinnerModule,
    MoneyPipe,
    ReactiveFormsModule,
  ],
  templateUrl: './deposit-section.html',
  styleUrl: './deposit-section.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DepositSection implements OnInit {
  private readonly api = inject(PaymentsApi);
  private readonly loans = inject(LoanApi);
  private readonly navigation = inject(ExternalNavigation);
  private readonly notifier = inject(Notifier);
  private readonly session = inject(SessionStore);
  private readonly polling = inject(CONFIRMATION_POLLING);
  private readonly locale = inject(LOCALE_ID);
  private readonly destroyRef = inject(DestroyRef);

  /** The loan (approved, or just confirmed after the hosted page). */
  readonly loan = input.required<Loan>();
  /** The loan's payments, once loaded. */
  readonly payments = input<LoanPayments | null>(null);
  /** IANA zone of each depot by site id, for the strategy estimate. */
  readonly depotZones = input<ReadonlyMap<number, string>>(new Map());
  /** How the buyer came back from the hosted page, if they did. */
  readonly returned = input<DepositReturn | null>(null);
  /** Whether the person may secure the deposit (a buyer of the loan's hospital). */
  readonly canPay = input(false);

  /** The loan changed (confirmed): the page reloads it and its payments. */
  readonly changed = output<void>();

  protected readonly phase = signal<ReturnPhase | null>(null);
  /** Which action is running: opening the card page, or confirming with the purchase order. */
  protected readonly busy = signal<'card' | 'purchase_order' | null>(null);
  protected readonly cardError = signal<string | null>(null);
  protected readonly purchaseOrderError = signal<string | null>(null);
  private readonly now = signal(new Date());
  private pollRun: Subscription | null = null;

  protected readonly purchaseOrder = new FormControl('', {
    nonNullable: true,
    validators: [
      (control): ValidationErrors | null => {
        const problem = purchaseOrderProblem(control.value as string);
        return problem ? { purchaseOrder: problem } : null;
      },
    ],
  });

  protected readonly purchaseOrderForm = new FormGroup({ purchaseOrder: this.purchaseOrder });

  protected readonly caution = depositCaution;
  protected readonly maxLength = purchaseOrderRule.maxLength;

  protected readonly deposit = computed(() => this.payments()?.deposit ?? this.loan().deposit);
  /** Whether there is nothing to pay (the rules asked for 0): one button confirms. */
  protected readonly nothingToPay = computed(() => this.deposit().amount === 0);
  protected readonly showForm = computed(
    () =>
      this.canPay() &&
      this.loan().state === 'approved' &&
      this.phase() !== 'confirming' &&
      this.phase() !== 'confirmed',
  );
  protected readonly creditAgreement = computed(
    () => this.payments()?.creditAgreementActive ?? false,
  );

  /** The strategy: the server's once it has chosen, else our estimate from the footprint. */
  protected readonly strategy = computed<{ name: DepositStrategyName; estimated: boolean } | null>(
    () => {
      const chosen = this.payments()?.strategy;
      if (chosen) return { name: chosen, estimated: false };
      if (this.nothingToPay()) return { name: 'no_deposit', estimated: false };
      const estimate = estimatedCardStrategy(this.loan(), this.depotZones(), this.now());
      return estimate ? { name: estimate, estimated: true } : null;
    },
  );
  protected readonly strategyLabel = computed(() => {
    const s = this.strategy();
    return s ? depositStrategyLabels[s.name] : null;
  });
  protected readonly strategyText = computed(() => {
    const s = this.strategy();
    return s ? depositStrategyExplanations[s.name] : null;
  });

  protected readonly deadline = computed(() => {
    const dueAt = this.payments()?.depositDueAt;
    if (!dueAt) return null;
    return {
      at: dueAt,
      text: formatInstant(dueAt, this.session.timeZone(), this.locale),
      left: dueIn(dueAt, this.now(), this.locale),
    };
  });

  constructor() {
    // Keep "due in …" current while the page stays open.
    interval(60_000)
      .pipe(takeUntilDestroyed())
      .subscribe(() => this.now.set(new Date()));
  }

  ngOnInit(): void {
    const returned = this.returned();
    if (returned?.outcome === 'success') this.confirmAfterPayment(returned.sessionId);
    else if (returned?.outcome === 'cancelled') this.phase.set('cancelled');
  }

  /** Opens the provider's hosted payment page (or confirms at once when nothing is due). */
  protected payByCard(): void {
    if (this.busy()) return;
    this.cardError.set(null);
    this.busy.set('card');
    this.secure({ method: 'card' }).subscribe({
      next: (answer) => {
        if (answer.outcome === 'checkout' && answer.checkoutUrl) {
          // Stay busy: the browser is leaving for the hosted page.
          this.navigation.assign(answer.checkoutUrl);
          return;
        }
        this.busy.set(null);
        this.confirmedHere(
          answer.outcome === 'no_deposit'
            ? `${this.loan().reference} is confirmed: there was no deposit to pay.`
            : `${this.loan().reference} is already confirmed.`,
        );
      },
      error: (error: unknown) => {
        this.busy.set(null);
        this.cardError.set(messageOf(error));
      },
    });
  }

  /** Confirms under the credit agreement with the purchase order number. */
  protected useCreditAgreement(): void {
    if (this.busy()) return;
    this.purchaseOrder.markAsTouched();
    this.purchaseOrderError.set(null);
    if (this.purchaseOrder.invalid) return;
    const purchaseOrderNumber = this.purchaseOrder.value.trim();
    this.busy.set('purchase_order');
    this.secure({ method: 'credit_agreement', purchaseOrderNumber }).subscribe({
      next: () => {
        this.busy.set(null);
        this.confirmedHere(
          `${this.loan().reference} is confirmed under your credit agreement with purchase order ${purchaseOrderNumber}.`,
        );
      },
      error: (error: unknown) => {
        this.busy.set(null);
        const field = error instanceof ApiError ? error.fieldErrors['purchaseOrderNumber'] : null;
        if (field) {
          this.purchaseOrder.setErrors({ server: field });
          return;
        }
        // 409 no_credit_agreement (and any other refusal): the server's own words.
        this.purchaseOrderError.set(messageOf(error));
      },
    });
  }

  /** Looks again after "still processing". */
  protected checkAgain(): void {
    this.confirmAfterPayment(this.returned()?.sessionId ?? null);
  }

  protected purchaseOrderMessage(): string | null {
    const errors = this.purchaseOrder.errors;
    if (!errors) return null;
    return (errors['server'] as string) ?? (errors['purchaseOrder'] as string) ?? null;
  }

  private secure(body: DepositRequest): Observable<DepositResponse> {
    return this.api.secureDeposit(this.loan().id, body);
  }

  private confirmedHere(message: string): void {
    this.notifier.success(message);
    this.changed.emit();
  }

  /**
   * After a successful payment: asks the server to check with the provider (the webhook may be
   * late), then looks at the loan every few seconds until it is confirmed, for a limited time.
   */
  private confirmAfterPayment(sessionId: string | null): void {
    this.pollRun?.unsubscribe();
    this.phase.set('confirming');
    const id = this.loan().id;
    const stop = timer(this.polling.timeoutMs);
    const firstCheck = this.api.refresh(id, sessionId).pipe(
      map((p): LoanState => p.loanState),
      // A failed check is not the end: the webhook may still confirm the loan.
      catchError(() => of<LoanState>('approved')),
    );
    const laterChecks = interval(this.polling.intervalMs).pipe(
      switchMap(() =>
        this.loans.get(id).pipe(
          map((loan): LoanState => loan.state),
          catchError(() => of<LoanState>('approved')),
        ),
      ),
    );
    let settled = false;
    this.pollRun = firstCheck
      .pipe(
        switchMap((state) => (state !== 'approved' ? of(state) : laterChecks)),
        filter((state) => state !== 'approved'),
        take(1),
        takeUntil(stop),
        tap(() => (settled = true)),
        takeUntilDestroyed(this.destroyRef),
      )
      .subscribe({
        next: (state) => {
          this.phase.set(securedStates.includes(state) ? 'confirmed' : 'stopped');
          this.changed.emit();
        },
        complete: () => {
          if (!settled) this.phase.set('slow');
        },
      });
  }
}
