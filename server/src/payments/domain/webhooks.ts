import { AppError } from '../../errors';
import { findPayment } from '../data-access/payment-repository';
import { applyPaymentFacts, recordRefund, type ApplyOutcome } from './confirmation';
import type { PaymentsDeps } from './deps';
import { factsFromIntent, factsFromSession, ourIds, type PaymentFacts } from './facts';
import type { ProviderEvent } from './provider';

/** Event types that change a payment; every other type is recorded and acknowledged. */
export const handledEventTypes = [
  'checkout.session.completed',
  'checkout.session.expired',
  'payment_intent.amount_capturable_updated',
  'payment_intent.succeeded',
  'payment_intent.payment_failed',
  'payment_intent.canceled',
  'refund.created',
] as const;

/**
 * Verifies a webhook delivery with the SDK (`webhooks.constructEvent`: HMAC-SHA256 of
 * `<t>.<raw body>` with our endpoint secret, timestamp within the SDK's default 300 s
 * tolerance). Throws a 400 `invalid_signature` for a missing, tampered or stale signature;
 * nothing is read or written before this check passes.
 */
export function verifyWebhook(
  deps: Pick<PaymentsDeps, 'provider' | 'config'>,
  rawBody: Buffer,
  signature: string | undefined,
): ProviderEvent {
  if (!signature) {
    throw AppError.badRequest('invalid_signature', 'The webhook signature header is missing.');
  }
  try {
    return deps.provider.webhooks.constructEvent(rawBody, signature, deps.config.webhookSecret);
  } catch {
    throw AppError.badRequest(
      'invalid_signature',
      'The webhook signature is not valid for this body, or it is too old.',
    );
  }
}

/**
 * What the event says about one of our payments. Reads the provider through the SDK where the
 * event's object is not enough (a completed checkout session names its PaymentIntent by id);
 * this runs BEFORE the transaction, and a failed read fails the delivery (the provider retries).
 */
async function factsOf(deps: PaymentsDeps, event: ProviderEvent): Promise<PaymentFacts | null> {
  const object = event.data.object as unknown;
  switch (event.type) {
    case 'payment_intent.amount_capturable_updated':
    case 'payment_intent.succeeded':
    case 'payment_intent.payment_failed':
    case 'payment_intent.canceled':
      return factsFromIntent(object as Parameters<typeof factsFromIntent>[0]);
    case 'checkout.session.completed':
    case 'checkout.session.expired': {
      const session = object as Parameters<typeof factsFromSession>[0];
      if (!ourIds(session.metadata).loanId) return null;
      if (session.status === 'complete' && typeof session.payment_intent === 'string') {
        // The intent as it is now (fresher than any snapshot).
        const intent = await deps.provider.paymentIntents.retrieve(session.payment_intent);
        return factsFromSession(session, intent);
      }
      return factsFromSession(session);
    }
    default:
      return null;
  }
}

/**
 * Handles one verified event, at most once per event id: the facts go through the shared
 * confirmation path ({@link applyPaymentFacts}), which records the event id in the same
 * transaction as the change. A refund we did not make ourselves (`refund.created`) is recorded
 * once per refund id.
 */
export async function handleWebhookEvent(
  deps: PaymentsDeps,
  event: ProviderEvent,
): Promise<ApplyOutcome> {
  const facts = await factsOf(deps, event);
  const outcome = await applyPaymentFacts(deps, facts, {
    id: event.id,
    type: event.type,
    created: event.created,
  });
  if (event.type === 'refund.created' && outcome.outcome !== 'duplicate') {
    const refund = event.data.object as {
      id: string;
      amount: number;
      currency: string;
      status: string | null;
      payment_intent: string | { id: string } | null;
      metadata: Record<string, string> | null;
    };
    const intentId =
      typeof refund.payment_intent === 'string' ? refund.payment_intent : refund.payment_intent?.id;
    const row = intentId
      ? await findPayment(deps.dataSource.manager, { paymentIntentId: intentId })
      : null;
    if (row) {
      await recordRefund(deps, row.id, {
        id: refund.id,
        amount: refund.amount,
        currency: refund.currency,
        status: refund.status ?? 'succeeded',
        reason:
          refund.metadata?.why === 'loan_not_active'
            ? 'loan_not_active'
            : refund.metadata?.why === 'duplicate'
              ? 'duplicate'
              : 'settlement',
      });
    }
  }
  return outcome;
}
