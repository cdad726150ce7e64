// The loans component's front door: other components and the app use only what is exported here.
export { loanRoutes } from './api/routes';
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
export { canSeeLoan, getLoan, listLoans } from './domain/queries';
