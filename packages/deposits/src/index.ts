/**
 * @evalon/deposits: pure deposit computation (no I/O). Money is integer minor units plus an
 * ISO 4217 code. Computed deposits are estimates until the lender confirms the loan.
 */
export {
  defaultDepositWindowMs,
  depositDeadline,
  unitDepositDueBy,
  type DeadlineUnit,
} from './deadline';
export { DepositError, type DepositErrorCode } from './errors';
export { assertInteger, currencyExponent, formatMoney, toMinor, type Money } from './money';
export { PROVIDER_MINIMUM_CHARGE, providerMinimumCharge } from './provider-minimums';
export {
  assertDepositRule,
  depositForLoan,
  depositForModel,
  type DepositDue,
  type DepositRule,
  type DepositTerms,
  type DepositWaived,
  type LoanDeposit,
  type LoanUnitDepositInput,
  type UnitDeposit,
} from './deposit';
export {
  CARD_AUTHORISATION_WINDOW_MS,
  chooseStrategy,
  type DepositStrategy,
  type Instant,
  type StrategyInput,
} from './strategy';
export {
  settle,
  settleHold,
  type Charge,
  type ChargeAllocation,
  type HoldSettlement,
  type Settlement,
} from './settlement';
