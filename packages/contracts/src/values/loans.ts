/*
 * Loan values without zod, for the browser and the schemas alike.
 */

/** Columns `GET /api/loans` sorts by. */
export const loanSortFields = [
  'reference',
  'equipment',
  'campus',
  'window',
  'state',
  'deposit',
  'requested',
] as const;
/** A sortable column of the loan list. */
export type LoanSortField = (typeof loanSortFields)[number];

export const loanStates = [
  'requested',
  'approved',
  'confirmed',
  'shipped',
  'delivered',
  'returning',
  'returned',
  'closed',
  'declined',
  'cancelled',
  'expired',
] as const;
/** One of `loanStates`. */
export type LoanState = (typeof loanStates)[number];

/** Plain-language labels for loan states (our own words). */
export const loanStateLabels: Record<LoanState, string> = {
  requested: 'Waiting for lender',
  approved: 'Approved — deposit due',
  confirmed: 'Confirmed',
  shipped: 'On its way',
  delivered: 'At the hospital',
  returning: 'On its way back',
  returned: 'Back at depot',
  closed: 'Closed',
  declined: 'Declined',
  cancelled: 'Cancelled',
  expired: 'Expired',
};

/** Longest use window a loan may ask for, in calendar days (both ends counted). */
export const maxUseWindowDays = 90;

/** Most units in one loan. */
export const maxUnitsPerLoan = 20;

/** How far ahead the availability search looks for the earliest free window, in days. */
export const availabilityHorizonDays = 180;

/**
 * The caution every screen and e-mail that shows computed dates or deposits repeats
 * (product brief: estimates until the lender confirms; local rules prevail).
 */
export const estimateCaution =
  'Dates and deposits are estimates until the lender confirms the loan; contracts, carriers’ ' +
  'commitments and local rules prevail.';

/** Why a unit cannot be lent for the requested window. */
export const unavailableReasons = [
  'booked',
  'booked_by_you',
  'maintenance',
  'too_soon',
  'not_active',
] as const;
/** One of `unavailableReasons`. */
export type UnavailableReason = (typeof unavailableReasons)[number];

/** Words shown for each reason (our own). */
export const unavailableReasonLabels: Record<UnavailableReason, string> = {
  booked: 'Booked by another hospital',
  booked_by_you: 'Already booked by your hospital',
  maintenance: 'In maintenance',
  too_soon: 'Too soon: it could not arrive in time',
  not_active: 'Not available for loans',
};

/** Longest note on a loan request. */
export const loanNoteMaxLength = 2000;

/** Shortest and longest reason for cancelling or declining, and the message when too short. */
export const reasonRule = {
  minLength: 3,
  maxLength: 1000,
  tooShort: 'Say why in a few words.',
} as const;

/** States a loan ends in without being used: the side exits at the end of `loanStates`. */
export const stoppedLoanStates: readonly LoanState[] = ['declined', 'cancelled', 'expired'];
