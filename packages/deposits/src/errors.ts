/** Machine-readable reasons a deposit computation refuses its input. */
export type DepositErrorCode =
  | 'invalid_amount'
  | 'unknown_currency'
  | 'invalid_rule'
  | 'empty_loan'
  | 'mixed_currencies'
  | 'purchase_order_required'
  | 'invalid_instant'
  | 'invalid_footprint'
  | 'invalid_charge';

/**
 * The one error type of this package. The `code` lets the server map it to its own error
 * response without parsing the message; the message is written for a person.
 */
export class DepositError extends Error {
  /** Machine-readable reason, stable across releases. */
  readonly code: DepositErrorCode;

  /**
   * @param code Machine-readable reason.
   * @param message Explanation for a person, naming the offending value.
   */
  constructor(code: DepositErrorCode, message: string) {
    super(message);
    this.name = 'DepositError';
    this.code = code;
  }
}
