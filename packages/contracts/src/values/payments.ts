/*
 * Deposit, payment and loan document values without zod, for the browser and the schemas alike.
 */

/**
 * How a loan's deposit was (or will be) secured: a card authorisation hold captured at
 * settlement, a card charge refunded at settlement, waived under the hospital's credit agreement
 * with the lender, or nothing to secure (the deposit rules asked for 0).
 */
export const depositStrategies = [
  'authorise_hold',
  'charge_now_refund_later',
  'credit_agreement',
  'no_deposit',
] as const;
/** One of `depositStrategies`. */
export type DepositStrategyName = (typeof depositStrategies)[number];

/** Plain-language labels (our own words). */
export const depositStrategyLabels: Record<DepositStrategyName, string> = {
  authorise_hold: 'Held on the card, captured at settlement',
  charge_now_refund_later: 'Charged to the card, refunded at settlement',
  credit_agreement: 'Waived: purchase order under the credit agreement',
  no_deposit: 'No deposit required',
};

/** A payment row: a card hold, a card charge, or a waiver. */
export const paymentKinds = ['hold', 'charge', 'waived'] as const;
/** One of `paymentKinds`. */
export type PaymentKind = (typeof paymentKinds)[number];

export const paymentStatuses = [
  'pending',
  'authorised',
  'captured',
  'partially_refunded',
  'refunded',
  'cancelled',
  'failed',
  'waived',
] as const;
/** One of `paymentStatuses`. */
export type PaymentStatus = (typeof paymentStatuses)[number];

/** The caution shown with deposits (product brief: estimates until the lender confirms). */
export const depositCaution =
  'The deposit is refundable security, settled after the return inspection; inspection charges ' +
  'are deducted, never more than was paid. Amounts are estimates until the lender confirms; ' +
  'contracts and local rules prevail.';

/** Documents a hospital files for a loan. */
export const loanDocumentKinds = ['purchase_order', 'loan_agreement'] as const;
/** One of `loanDocumentKinds`. */
export type LoanDocumentKind = (typeof loanDocumentKinds)[number];

export const loanDocumentKindLabels: Record<LoanDocumentKind, string> = {
  purchase_order: 'Purchase order',
  loan_agreement: 'Signed loan agreement',
};

/** Largest document accepted, in bytes (10 MB). */
export const maxLoanDocumentBytes = 10 * 1024 * 1024;

/**
 * The purchase order number rule and its messages. ASCII only: purchase order numbers travel
 * into other systems' fields and e-mails.
 */
export const purchaseOrderRule = {
  maxLength: 64,
  pattern: /^[A-Za-z0-9 ._/#-]+$/,
  required: 'Enter the purchase order number.',
  tooLong: 'A purchase order number has at most 64 characters.',
  badCharacters: 'Use letters, digits, spaces and . _ / # - only.',
} as const;

/**
 * What is wrong with a purchase order number, in the contract's words, or null when the server
 * would accept it. The contract trims the value first, so surrounding spaces are fine.
 */
export function purchaseOrderProblem(value: string | null | undefined): string | null {
  const trimmed = (value ?? '').trim();
  if (!trimmed) return purchaseOrderRule.required;
  if (trimmed.length > purchaseOrderRule.maxLength) return purchaseOrderRule.tooLong;
  if (!purchaseOrderRule.pattern.test(trimmed)) return purchaseOrderRule.badCharacters;
  return null;
}
