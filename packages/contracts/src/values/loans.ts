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
