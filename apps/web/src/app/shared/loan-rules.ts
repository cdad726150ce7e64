import type { LoanState, ModelCategory, UnavailableReason } from '@evalon/contracts';

/*
 * Loan and catalogue rules from `@evalon/contracts`, restated as plain values for the browser.
 * The contracts are zod schemas: importing them at runtime adds the schema library (about
 * 470 kB before compression, measured with esbuild) to every page that shows a loan. The spec
 * beside this file compares each value with the contract, so a change there fails the client
 * tests until it is copied here.
 */

/** Every loan state, in the contract's order (the happy path first, then the side exits). */
export const loanStates: readonly LoanState[] = [
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
];

/** Plain-language labels for loan states (contract: `loanStateLabels`). */
export const loanStateLabels: Readonly<Record<LoanState, string>> = {
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

/** States a loan ends in without being used (contract: the side exits of `loanStates`). */
export const stoppedLoanStates: readonly LoanState[] = ['declined', 'cancelled', 'expired'];

/** Categories of equipment, in the contract's order (contract: `modelCategories`). */
export const modelCategories: readonly ModelCategory[] = [
  'robotic_platform',
  'flexible_endoscope',
  'laser',
  'imaging',
  'fluid_management',
  'accessory',
];

/** Human labels for categories (contract: `modelCategoryLabels`). */
export const modelCategoryLabels: Readonly<Record<ModelCategory, string>> = {
  robotic_platform: 'Robotic platform',
  flexible_endoscope: 'Flexible endoscope',
  laser: 'Laser system',
  imaging: 'Imaging tower',
  fluid_management: 'Fluid management',
  accessory: 'Accessory',
};

/** Words for why a unit cannot be lent (contract: `unavailableReasonLabels`). */
export const unavailableReasonLabels: Readonly<Record<UnavailableReason, string>> = {
  booked: 'Booked by another hospital',
  booked_by_you: 'Already booked by your hospital',
  maintenance: 'In maintenance',
  too_soon: 'Too soon: it could not arrive in time',
  not_active: 'Not available for loans',
};

/** Longest use window, in calendar days with both ends counted (contract: `maxUseWindowDays`). */
export const maxUseWindowDays = 90;

/** Most units in one loan (contract: `maxUnitsPerLoan`). */
export const maxUnitsPerLoan = 20;

/** How far ahead the earliest free window is looked for (contract: `availabilityHorizonDays`). */
export const availabilityHorizonDays = 180;

/** Longest note on a loan request (contract: `createLoanRequest.note`). */
export const loanNoteMaxLength = 2000;

/** Shortest and longest cancellation reason (contract: `reasonRequest.reason`). */
export const reasonRule = {
  minLength: 3,
  maxLength: 1000,
  tooShort: 'Say why in a few words.',
} as const;
