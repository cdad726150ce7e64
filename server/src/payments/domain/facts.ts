import type { PaymentKind, PaymentStatus } from '@evalon/contracts';
import type { PaymentRow } from '../data-access/payment-repository';
import type { ProviderCheckoutSession, ProviderPaymentIntent } from './provider';

/**
 * What the provider says about one payment of one loan, read from an event's object or fetched
 * through the SDK. Amounts are integer minor units; the currency is upper case (ISO 4217).
 */
export interface PaymentFacts {
  loanId: number;
  /** Our payment row id, from the provider object's metadata (absent for foreign objects). */
  paymentId: number | null;
  checkoutSessionId: string | null;
  paymentIntentId: string | null;
  /** `hold` for manual capture, `charge` for automatic; null when not known yet. */
  kind: Exclude<PaymentKind, 'waived'> | null;
  status: Exclude<PaymentStatus, 'waived'>;
  amount: number;
  currency: string;
  /** Held and capturable now. */
  amountAuthorised: number;
  /** Captured so far. */
  amountCaptured: number;
  failureCode: string | null;
  failureMessage: string | null;
}

const positiveInt = (value: unknown): number | null => {
  const n = typeof value === 'string' && /^\d{1,10}$/.test(value) ? Number(value) : NaN;
  return Number.isSafeInteger(n) && n > 0 ? n : null;
};

/** Our ids from a provider object's metadata (we always set `loanId` and `paymentId`). */
export function ourIds(metadata: Record<string, string> | null | undefined): {
  loanId: number | null;
  paymentId: number | null;
} {
  return { loanId: positiveInt(metadata?.loanId), paymentId: positiveInt(metadata?.paymentId) };
}

/** Facts from a PaymentIntent (an event's snapshot or a fresh read); null when not ours. */
export function factsFromIntent(
  pi: ProviderPaymentIntent,
  checkoutSessionId: string | null = null,
): PaymentFacts | null {
  const { loanId, paymentId } = ourIds(pi.metadata);
  if (!loanId) return null;
  let status: PaymentFacts['status'];
  switch (pi.status) {
    case 'requires_capture':
      status = 'authorised';
      break;
    case 'succeeded':
      status = 'captured';
      break;
    case 'canceled':
      status = 'cancelled';
      break;
    case 'requires_payment_method':
      status = pi.last_payment_error ? 'failed' : 'pending';
      break;
    default:
      status = 'pending';
  }
  const error = pi.last_payment_error;
  return {
    loanId,
    paymentId,
    checkoutSessionId,
    paymentIntentId: pi.id,
    kind: pi.capture_method === 'manual' ? 'hold' : 'charge',
    status,
    amount: pi.amount,
    currency: pi.currency.toUpperCase(),
    amountAuthorised: status === 'authorised' ? pi.amount_capturable : 0,
    amountCaptured: status === 'captured' ? pi.amount_received : 0,
    failureCode: status === 'failed' ? (error?.decline_code ?? error?.code ?? 'failed') : null,
    failureMessage: status === 'failed' ? (error?.message ?? 'The card was declined.') : null,
  };
}

/**
 * Facts from a Checkout Session. A completed session needs its PaymentIntent: pass it expanded
 * (`expand: ['payment_intent']`) or as `intent`; without it a completed session gives null and
 * the caller must fetch the intent. An expired session cancels its pending payment row.
 */
export function factsFromSession(
  session: ProviderCheckoutSession,
  intent?: ProviderPaymentIntent | null,
): PaymentFacts | null {
  const { loanId, paymentId } = ourIds(session.metadata);
  if (!loanId) return null;
  const pi = intent ?? (typeof session.payment_intent === 'object' ? session.payment_intent : null);
  if (pi) {
    const facts = factsFromIntent(pi, session.id);
    return facts ? { ...facts, loanId, paymentId: paymentId ?? facts.paymentId } : null;
  }
  if (session.status === 'complete') return null;
  return {
    loanId,
    paymentId,
    checkoutSessionId: session.id,
    paymentIntentId: typeof session.payment_intent === 'string' ? session.payment_intent : null,
    kind: null,
    status: session.status === 'expired' ? 'cancelled' : 'pending',
    amount: session.amount_total ?? 0,
    currency: (session.currency ?? '').toUpperCase(),
    amountAuthorised: 0,
    amountCaptured: 0,
    failureCode: null,
    failureMessage: null,
  };
}

/**
 * Order of payment statuses: a later event never moves a payment back (an old snapshot of an
 * authorised intent delivered after the capture changes nothing).
 */
const rank: Record<PaymentStatus, number> = {
  pending: 0,
  failed: 1,
  authorised: 2,
  captured: 3,
  partially_refunded: 4,
  refunded: 5,
  cancelled: 5,
  waived: 9,
};

/** The status after refunds: captured, partially refunded or refunded. */
export function statusAfterRefunds(captured: number, refunded: number): PaymentStatus {
  if (captured > 0 && refunded >= captured) return 'refunded';
  if (refunded > 0) return 'partially_refunded';
  return 'captured';
}

/** The changes that bring a payment row in line with newer facts (empty when nothing is new). */
export function mergeFacts(
  row: PaymentRow,
  facts: PaymentFacts,
): Partial<
  Pick<
    PaymentRow,
    | 'status'
    | 'kind'
    | 'amountAuthorised'
    | 'amountCaptured'
    | 'checkoutSessionId'
    | 'paymentIntentId'
    | 'failureCode'
    | 'failureMessage'
  >
> {
  const changes: ReturnType<typeof mergeFacts> = {};
  if (facts.paymentIntentId && !row.paymentIntentId)
    changes.paymentIntentId = facts.paymentIntentId;
  if (facts.checkoutSessionId && !row.checkoutSessionId) {
    changes.checkoutSessionId = facts.checkoutSessionId;
  }
  if (facts.kind && row.kind !== 'waived' && facts.kind !== row.kind) changes.kind = facts.kind;
  const newer =
    rank[facts.status] > rank[row.status] || (facts.status === 'failed' && row.status === 'failed');
  if (!newer) return changes;
  changes.status = facts.status;
  if (facts.status === 'failed') {
    changes.failureCode = facts.failureCode;
    changes.failureMessage = facts.failureMessage;
  }
  if (facts.status === 'authorised') changes.amountAuthorised = facts.amountAuthorised;
  if (facts.status === 'captured') {
    changes.amountCaptured = Math.max(row.amountCaptured, facts.amountCaptured);
    changes.amountAuthorised = 0;
    // Refunds recorded before the capture event arrived still count.
    changes.status = statusAfterRefunds(changes.amountCaptured, row.amountRefunded);
  }
  if (facts.status === 'cancelled') changes.amountAuthorised = 0;
  return changes;
}

/** Whether a payment in this status holds the hospital's money (held or kept). */
export function holdsMoney(status: PaymentStatus): boolean {
  return status === 'authorised' || status === 'captured' || status === 'partially_refunded';
}
