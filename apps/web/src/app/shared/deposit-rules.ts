import type {
  DepositStrategyName,
  LoanDocumentKind,
  OutboxStatus,
  PaymentKind,
  PaymentStatus,
} from '@evalon/contracts';

/*
 * Deposit, document and outbox rules from `@evalon/contracts`, restated as plain values for the
 * browser. The contracts are zod schemas: importing them at runtime adds the schema library
 * (about 450 kB before compression) to every page that shows a deposit. `deposit-rules.spec.ts`
 * compares each value with the contract, so a change there fails the client tests until it is
 * copied here.
 */

/** How a deposit is secured, in the contract's order (contract: `depositStrategies`). */
export const depositStrategies: readonly DepositStrategyName[] = [
  'authorise_hold',
  'charge_now_refund_later',
  'credit_agreement',
  'no_deposit',
];

/** Short labels for each strategy (contract: `depositStrategyLabels`). */
export const depositStrategyLabels: Readonly<Record<DepositStrategyName, string>> = {
  authorise_hold: 'Held on the card, captured at settlement',
  charge_now_refund_later: 'Charged to the card, refunded at settlement',
  credit_agreement: 'Waived: purchase order under the credit agreement',
  no_deposit: 'No deposit required',
};

/**
 * What each strategy means for the hospital, in a sentence or two (our own words; the card
 * authorisation window of 7 days is the payment provider's, see reference-values.md).
 */
export const depositStrategyExplanations: Readonly<Record<DepositStrategyName, string>> = {
  authorise_hold:
    'The whole loan, from shipping to the unit being ready again, fits inside the 7 days a card ' +
    'hold stays valid, so the amount is only held on the card. Nothing is charged unless the ' +
    'return inspection finds damage; the rest of the hold is released.',
  charge_now_refund_later:
    'The loan lasts longer than the 7 days a card hold stays valid, so the deposit is charged ' +
    'now and refunded after the return inspection, less any inspection charges.',
  credit_agreement:
    'Your hospital’s credit agreement with the lender covers the deposit; the purchase order ' +
    'number is recorded with the loan and nothing is charged to a card.',
  no_deposit: 'The lender asks for no deposit on this loan, so there is nothing to pay.',
};

/** Kinds of payment row, in the contract's order (contract: `paymentKinds`). */
export const paymentKinds: readonly PaymentKind[] = ['hold', 'charge', 'waived'];

/** Our words for each kind of payment row. */
export const paymentKindLabels: Readonly<Record<PaymentKind, string>> = {
  hold: 'Card hold',
  charge: 'Card charge',
  waived: 'Waived',
};

/** Payment statuses, in the contract's order (contract: `paymentStatuses`). */
export const paymentStatuses: readonly PaymentStatus[] = [
  'pending',
  'authorised',
  'captured',
  'partially_refunded',
  'refunded',
  'cancelled',
  'failed',
  'waived',
];

/** How a payment status reads at a glance: its label and tone for the status chip. */
export const paymentStatusLooks: Readonly<
  Record<PaymentStatus, { label: string; tone: 'waiting' | 'good' | 'neutral' | 'bad' }>
> = {
  pending: { label: 'Waiting for payment', tone: 'waiting' },
  authorised: { label: 'Held on card', tone: 'good' },
  captured: { label: 'Charged', tone: 'good' },
  partially_refunded: { label: 'Partly refunded', tone: 'neutral' },
  refunded: { label: 'Refunded', tone: 'neutral' },
  cancelled: { label: 'Released', tone: 'neutral' },
  failed: { label: 'Failed', tone: 'bad' },
  waived: { label: 'Waived', tone: 'good' },
};

/** Why money went back (contract: `refund.reason`). */
export const refundReasonLabels: Readonly<
  Record<'loan_not_active' | 'duplicate' | 'settlement', string>
> = {
  loan_not_active: 'Paid after the loan had stopped',
  duplicate: 'Paid twice',
  settlement: 'Settled after the return inspection',
};

/** The caution shown with deposits (contract: `depositCaution`). */
export const depositCaution =
  'The deposit is refundable security, settled after the return inspection; inspection charges ' +
  'are deducted, never more than was paid. Amounts are estimates until the lender confirms; ' +
  'contracts and local rules prevail.';

/** The purchase order number rule (contract: `depositRequest`, method `credit_agreement`). */
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

/** Documents a hospital files for a loan (contract: `loanDocumentKinds`). */
export const loanDocumentKinds: readonly LoanDocumentKind[] = ['purchase_order', 'loan_agreement'];

/** Labels of the document kinds (contract: `loanDocumentKindLabels`). */
export const loanDocumentKindLabels: Readonly<Record<LoanDocumentKind, string>> = {
  purchase_order: 'Purchase order',
  loan_agreement: 'Signed loan agreement',
};

/** Largest document accepted, in bytes: 10 MB (contract: `maxLoanDocumentBytes`). */
export const maxLoanDocumentBytes = 10 * 1024 * 1024;

/** Outbox statuses (contract: `outboxStatuses`). */
export const outboxStatuses: readonly OutboxStatus[] = ['pending', 'sending', 'sent', 'parked'];

/** Our words for each outbox status. */
export const outboxStatusLabels: Readonly<Record<OutboxStatus, string>> = {
  pending: 'Waiting to send',
  sending: 'Sending',
  sent: 'Sent',
  parked: 'Could not be delivered',
};
