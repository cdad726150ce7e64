import {
  ChangeDetectionStrategy,
  Component,
  LOCALE_ID,
  computed,
  inject,
  input,
  output,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import type { LoanPayments, Money, Payment, Refund } from '@evalon/contracts';
import { SessionStore } from '../../core/session-store';
import { depositStrategyLabels } from '@evalon/contracts/values';
import {
  paymentKindLabels,
  paymentStatusLooks,
  refundReasonLabels,
} from '../../shared/deposit-rules';
import { MoneyPipe } from '../../shared/formats';
import { formatInstant } from '../../shared/iso-date';
import { PillTone, StatusPill } from '../../shared/status-pill/status-pill';

/** A payment ready to show. */
interface PaymentRow {
  readonly payment: Payment;
  readonly kind: string;
  readonly status: string;
  readonly tone: string;
  readonly created: string;
  readonly settled: string | null;
}

/** A refund ready to show. */
interface RefundRow {
  readonly refund: Refund;
  readonly reason: string;
  readonly created: string;
}

/**
 * What was held, charged and refunded for a loan (both parties): the totals, each payment with
 * its status and dates, refunds, the strategy and the purchase order under a credit agreement.
 */
@Component({
  selector: 'ev-loan-payments',
  imports: [MatButtonModule, MatCardModule, MatProgressBarModule, MoneyPipe, StatusPill],
  templateUrl: './loan-payments.html',
  styleUrl: './loan-payments.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoanPaymentsCard {
  private readonly session = inject(SessionStore);
  /** Pill colour of each payment look. */
  protected readonly pillTones: Readonly<Record<string, PillTone>> = {
    waiting: 'tertiary',
    good: 'primary',
    neutral: 'neutral',
    bad: 'error',
  };
  private readonly locale = inject(LOCALE_ID);

  /** The loan's deposit (shown even when the payments could not be loaded). */
  readonly deposit = input.required<Money>();
  /** The lender, for "an estimate until … confirms". */
  readonly lenderName = input('the lender');
  /** The loan's payments, once loaded. */
  readonly payments = input<LoanPayments | null>(null);
  /** Whether they are loading. */
  readonly loading = input(false);
  /** Why they could not be loaded, if they could not. */
  readonly error = input<string | null>(null);
  /** Whether to repeat the deposit caution here (not when the deposit section shows it). */
  readonly showCaution = input(true);

  /** Asks the page to load them again. */
  readonly retry = output<void>();

  private readonly when = (at: string) => formatInstant(at, this.session.timeZone(), this.locale);

  protected readonly totals = computed(() => {
    const p = this.payments();
    if (!p) return null;
    const money = (amount: number): Money => ({ amount, currency: p.deposit.currency });
    return {
      held: money(p.totals.held),
      charged: money(p.totals.charged),
      refunded: money(p.totals.refunded),
    };
  });
  /** Whether nothing is paid: waived under a credit agreement, or no deposit asked for. */
  protected readonly waived = computed(() => {
    const s = this.payments()?.strategy;
    return s === 'credit_agreement' || s === 'no_deposit';
  });
  /** Whether the amount is still an estimate (before the lender confirms). */
  protected readonly estimate = computed(() => {
    const state = this.payments()?.loanState;
    return !state || state === 'requested' || state === 'approved';
  });
  protected readonly strategy = computed(() => {
    const s = this.payments()?.strategy;
    return s ? depositStrategyLabels[s] : null;
  });
  protected readonly confirmed = computed(() => {
    const at = this.payments()?.confirmedAt;
    return at ? this.when(at) : null;
  });
  protected readonly rows = computed<PaymentRow[]>(() =>
    [...(this.payments()?.payments ?? [])]
      .sort((a, b) => b.createdAt.localeCompare(a.createdAt) || b.id - a.id)
      .map((payment) => ({
        payment,
        kind: paymentKindLabels[payment.kind],
        status: paymentStatusLooks[payment.status].label,
        tone: paymentStatusLooks[payment.status].tone,
        created: this.when(payment.createdAt),
        settled: payment.settledAt ? this.when(payment.settledAt) : null,
      })),
  );
  protected readonly refunds = computed<RefundRow[]>(() =>
    (this.payments()?.refunds ?? []).map((refund) => ({
      refund,
      reason: refundReasonLabels[refund.reason],
      created: this.when(refund.createdAt),
    })),
  );
}
