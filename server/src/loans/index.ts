// The loans component's front door: other components and the app use only what is exported
// here. The model for a component: see "Adding a server component" in DEVELOPERS.md.
import { availabilityDepsOf } from '../availability';
import type { AppComponent } from '../app-services';
import { Loans1764720060000 } from '../database/migrations/1764720060000-loans';
import { HoldsHospital1764979200000 } from '../database/migrations/1764979200000-holds-hospital';
import { LoanReferenceNocache1765238400000 } from '../database/migrations/1765238400000-loan-reference-nocache';
import { loanRoutes } from './api/routes';
import { HoldEntity, LoanEntity, LoanEventEntity, LoanUnitEntity } from './data-access/entities';
import type { LoanDeps } from './domain/deps';

export type { LoanDeps } from './domain/deps';
export {
  loanNotificationEvents,
  noLoanNotifications,
  type LoanEventNotice,
  type LoanNotificationEvent,
  type NotifyLoanEvent,
} from './domain/notifications';
export {
  allowedActions,
  loanTransitionActions,
  loanTransitionTable,
  planTransition,
  releasesHolds,
  type LoanTransitionAction,
  type TransitionPlan,
  type TransitionRule,
} from './domain/state-machine';
export {
  applyLoanTransition,
  transitionLoan,
  type LoanActor,
  type TransitionContext,
} from './domain/transitions';
export { requestLoan } from './domain/booking';
// The deposit columns belong to the loans table; payments writes them through these.
export { setLoanDepositDueAt, setLoanDepositOutcome } from './data-access/loan-repository';
// Shipments lock a loan (before its legs) to move it along the journey.
export { lockLoan } from './data-access/loan-repository';
export type { HoldRow, LoanRow, LoanUnitRow } from './data-access/entities';
export { assertLoanVisible, canSeeLoan, getLoan, listLoans } from './domain/queries';

/** Loans, their units, holds and events: tables, the state machine and `/api/loans`. */
export const loansComponent: AppComponent = {
  name: 'loans',
  entities: [LoanEntity, LoanUnitEntity, HoldEntity, LoanEventEntity],
  migrations: [Loans1764720060000, HoldsHospital1764979200000, LoanReferenceNocache1765238400000],
  routers: (ctx) => {
    const deps: LoanDeps = {
      ...availabilityDepsOf(ctx),
      // Loan e-mails and in-app notifications, written in the loan's own transaction.
      notifyLoanEvent: ctx.services.notifyLoanEvent,
      depositWindowMs: ctx.config.payments.depositWindowMs,
    };
    return [loanRoutes(deps, ctx.catalogue)];
  },
};
