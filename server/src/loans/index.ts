/**
 * The loans component's front door for other components: they import from here, never from
 * its data-access files.
 */
export { loanRoutes } from './api/routes';
export { HoldEntity, LoanEntity, LoanEventEntity, LoanUnitEntity } from './data-access/entities';
export type { HoldRow, LoanRow, LoanUnitRow } from './data-access/entities';
export { lockLoan } from './data-access/loan-repository';
export { canSeeLoan } from './domain/queries';
export { applyLoanTransition, journeyTransitions, type JourneyAction } from './domain/journey';
