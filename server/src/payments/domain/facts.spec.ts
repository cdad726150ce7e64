import type { PaymentRow } from '../data-access/payment-repository';
import { factsFromIntent, mergeFacts, statusAfterRefunds, type PaymentFacts } from './facts';
import type { ProviderPaymentIntent } from './provider';

/** A PaymentIntent as the provider shapes it (the fields these functions read). */
function intent(over: Partial<ProviderPaymentIntent>): ProviderPaymentIntent {
  return {
    id: 'pi_test_1',
    object: 'payment_intent',
    amount: 250_000,
    amount_capturable: 0,
    amount_received: 0,
    capture_method: 'automatic',
    currency: 'usd',
    last_payment_error: null,
    metadata: { loanId: '42', paymentId: '7' },
    status: 'requires_payment_method',
    ...over,
  } as ProviderPaymentIntent;
}

function row(over: Partial<PaymentRow>): PaymentRow {
  return {
    id: 7,
    loanId: 42,
    provider: 'processor',
    kind: 'charge',
    status: 'pending',
    amount: 250_000,
    currency: 'USD',
    amountAuthorised: 0,
    amountCaptured: 0,
    amountRefunded: 0,
    checkoutSessionId: 'cs_test_1',
    paymentIntentId: null,
    securesLoan: false,
    purchaseOrderNumber: null,
    failureCode: null,
    failureMessage: null,
    settledAt: null,
    settlement: null,
    createdByUserId: 1,
    createdAt: new Date(),
    updatedAt: new Date(),
    ...over,
  };
}

describe('payment facts', () => {
  it('maps the provider intent statuses to ours, amounts in minor units, currency upper case', () => {
    expect(
      factsFromIntent(
        intent({
          status: 'requires_capture',
          capture_method: 'manual',
          amount_capturable: 250_000,
        }),
      ),
    ).toMatchObject({
      loanId: 42,
      paymentId: 7,
      kind: 'hold',
      status: 'authorised',
      amountAuthorised: 250_000,
      currency: 'USD',
    });
    expect(
      factsFromIntent(intent({ status: 'succeeded', amount_received: 250_000 })),
    ).toMatchObject({ kind: 'charge', status: 'captured', amountCaptured: 250_000 });
    expect(factsFromIntent(intent({ status: 'canceled' }))?.status).toBe('cancelled');
    const declined = factsFromIntent(
      intent({
        last_payment_error: {
          type: 'card_error',
          code: 'card_declined',
          decline_code: 'insufficient_funds',
          message: 'Your card has insufficient funds.',
        },
      } as Partial<ProviderPaymentIntent>),
    );
    expect(declined).toMatchObject({ status: 'failed', failureCode: 'insufficient_funds' });
    // Not ours: no loan id in the metadata.
    expect(factsFromIntent(intent({ metadata: {} }))).toBeNull();
  });

  it('never moves a payment back: an old snapshot after the capture changes nothing', () => {
    const captured = row({
      kind: 'hold',
      status: 'captured',
      amountCaptured: 60_000,
      paymentIntentId: 'pi_test_1',
    });
    const old = factsFromIntent(
      intent({ status: 'requires_capture', capture_method: 'manual', amount_capturable: 250_000 }),
    ) as PaymentFacts;
    expect(mergeFacts(captured, old)).toEqual({});
    const pending = factsFromIntent(intent({ capture_method: 'manual' })) as PaymentFacts;
    expect(mergeFacts(captured, pending)).toEqual({});
  });

  it('moves forward: pending → failed → captured, keeping refunds counted before the capture', () => {
    const failed = factsFromIntent(
      intent({
        last_payment_error: {
          type: 'card_error',
          code: 'card_declined',
          decline_code: 'generic_decline',
          message: 'Declined.',
        },
      } as Partial<ProviderPaymentIntent>),
    ) as PaymentFacts;
    expect(mergeFacts(row({}), failed)).toMatchObject({
      status: 'failed',
      failureCode: 'generic_decline',
      paymentIntentId: 'pi_test_1',
    });
    const ok = factsFromIntent(
      intent({ status: 'succeeded', amount_received: 250_000 }),
    ) as PaymentFacts;
    expect(mergeFacts(row({ status: 'failed' }), ok)).toMatchObject({
      status: 'captured',
      amountCaptured: 250_000,
    });
    expect(mergeFacts(row({ status: 'pending', amountRefunded: 100_000 }), ok)).toMatchObject({
      status: 'partially_refunded',
    });
  });

  it('names the status after refunds', () => {
    expect(statusAfterRefunds(1000, 0)).toBe('captured');
    expect(statusAfterRefunds(1000, 1)).toBe('partially_refunded');
    expect(statusAfterRefunds(1000, 1000)).toBe('refunded');
  });
});
