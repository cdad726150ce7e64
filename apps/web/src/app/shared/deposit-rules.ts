import type {
  DepositStrategyName,
  OutboxStatus,
  PaymentKind,
  PaymentStatus,
} from '@evalon/contracts/values';

/*
 * The browser's own words for deposits, payments and the outbox. The contract's values (states,
 * labels, limits, the purchase order rule) come from `@evalon/contracts/values`; the records
 * here are keyed by the contract's types, so a new state fails the build until it has words.
 */

/**
 * What each strategy means for the hospital, in a sentence or two (our own words; the card
 * authorisation window of 7 days is the payment provider's, see docs/references.md).
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

/** Our words for each kind of payment row. */
export const paymentKindLabels: Readonly<Record<PaymentKind, string>> = {
  hold: 'Card hold',
  charge: 'Card charge',
  waived: 'Waived',
};

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

/** Our words for each outbox status. */
export const outboxStatusLabels: Readonly<Record<OutboxStatus, string>> = {
  pending: 'Waiting to send',
  sending: 'Sending',
  sent: 'Sent',
  parked: 'Could not be delivered',
};
