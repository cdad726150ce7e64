import type { AvailabilityDeps } from '../../availability';
import type { NotifyLoanEvent } from './notifications';

/** What the loan use cases need: the availability engine's deps plus the notification hook. */
export interface LoanDeps extends AvailabilityDeps {
  /** Called inside each loan-changing transaction (default: does nothing). */
  notifyLoanEvent: NotifyLoanEvent;
  /** How long a buyer has to secure the deposit after approval (from the configuration). */
  depositWindowMs: number;
}
