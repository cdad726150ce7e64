import PaymentsSdk from 'stripe';
import type { PaymentsConfig } from '../../config';

/** The payment provider's official SDK client. */
export type PaymentsClient = PaymentsSdk;
/** Types of the provider's objects, as the SDK declares them. */
export type ProviderEvent = PaymentsSdk.Event;
export type ProviderPaymentIntent = PaymentsSdk.PaymentIntent;
export type ProviderCheckoutSession = PaymentsSdk.Checkout.Session;

/**
 * Builds the one SDK client of a process: at most `maxNetworkRetries` automatic retries (the SDK
 * resends with the same idempotency key, so a retried POST never makes a second object) and a
 * per-request timeout. With an endpoint the SDK talks to it (the local payments fake) instead of
 * the provider's hosted API.
 */
export function createPaymentsClient(config: PaymentsConfig): PaymentsClient {
  return new PaymentsSdk(config.secretKey, {
    maxNetworkRetries: config.maxNetworkRetries,
    timeout: config.timeoutMs,
    telemetry: false,
    appInfo: { name: 'evalon-deposits', version: '0.1.0' },
    ...(config.endpoint ?? {}),
  });
}

/**
 * Idempotency keys are derived from our own ids, never random, so that a retry (by the SDK, by a
 * person pressing the button again, or after a crash) asks the provider for the same thing
 * under the same key and gets the first answer back. The version suffix lets a deliberate change
 * of parameters use fresh keys. Keys stay far below the provider's 255 characters.
 */
export const idempotencyKeys = {
  /**
   * Creating the checkout session of one payment row. The row's creation instant is part of the
   * key: ids restart when a database is rebuilt (demo reset, test runs) while the provider keeps
   * keys for 24 h, and the same id with new parameters would be refused as a reused key.
   */
  checkout: (loanId: number, paymentId: number, rowCreatedAt: Date) =>
    `loan-${loanId}-checkout-${paymentId}-${rowCreatedAt.getTime()}-v1`,
  /** Expiring an open checkout session (loan confirmed otherwise, expired or cancelled). */
  expireSession: (loanId: number, sessionId: string) => `loan-${loanId}-expire-${sessionId}-v1`,
  /** Cancelling a hold that no longer secures a live loan. */
  releaseHold: (loanId: number, intentId: string) => `loan-${loanId}-release-${intentId}-v1`,
  /** Refunding a charge that no longer secures a live loan. */
  releaseCharge: (loanId: number, intentId: string) => `loan-${loanId}-refund-${intentId}-v1`,
  /** Settlement of the securing payment (one per payment; the amount is part of the key). */
  settle: (
    loanId: number,
    intentId: string,
    step: 'capture' | 'cancel' | 'refund',
    amount: number,
  ) => `loan-${loanId}-settle-${step}-${intentId}-${amount}-v1`,
};

/** Whether an error from the SDK is the provider refusing the request (4xx), not an outage. */
export function isProviderRefusal(error: unknown): error is PaymentsSdk.errors.StripeError {
  const e = error as { type?: string; statusCode?: number } | null;
  return (
    !!e &&
    typeof e.statusCode === 'number' &&
    e.statusCode >= 400 &&
    e.statusCode < 500 &&
    e.statusCode !== 409 &&
    e.statusCode !== 429
  );
}
