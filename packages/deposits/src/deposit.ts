import { DepositError } from './errors';
import { assertInteger, currencyExponent } from './money';
import { providerMinimumCharge } from './provider-minimums';

/** Basis points in one whole (100 % = 10,000 bp). */
const BPS_PER_WHOLE = 10_000n;

/** A lender's deposit rule for one model: a share of the list value, kept within bounds. */
export interface DepositRule {
  /** Share of the model's list value, in basis points (1 bp = 0.01 %); integer 0–10,000. */
  percentBps: number;
  /** Smallest deposit, integer minor units of `currency`. */
  min: number;
  /** Largest deposit, integer minor units of `currency`; not below `min`. */
  max: number;
  /** ISO 4217 code of `min`, `max` and of the list value the rule is applied to. */
  currency: string;
}

/** One unit of a loan, with what its deposit is computed from. */
export interface LoanUnitDepositInput {
  /** The unit's id, echoed back in the breakdown. */
  unitId: string;
  /** The model's list value, integer minor units in the rule's currency. */
  listValue: number;
  /** The deposit rule of the unit's model. */
  rule: DepositRule;
}

/** The hospital's payment terms that decide whether a deposit is taken at all. */
export interface DepositTerms {
  /** Whether the hospital has a credit agreement with the lender that the lender has approved. */
  hasApprovedCreditAgreement?: boolean;
  /** The hospital's purchase order number; required when the deposit is waived. */
  purchaseOrderNumber?: string;
}

/** Deposit of one unit, after its model's clamp. */
export interface UnitDeposit {
  /** The unit's id. */
  unitId: string;
  /** Deposit for this unit, integer minor units. */
  amount: number;
}

/** A deposit to be secured from the hospital. */
export interface DepositDue {
  /** Whether the deposit is waived; always `false` here. */
  waived: false;
  /** ISO 4217 code shared by every unit of the loan. */
  currency: string;
  /** Per-unit deposits, in the order given. */
  units: UnitDeposit[];
  /** Sum of the per-unit deposits, integer minor units. */
  subtotal: number;
  /** Amount to secure: the subtotal, raised to the provider's minimum when it is below it. */
  amount: number;
  /** The provider's minimum charge in this currency, or `null` when our table does not know it. */
  providerMinimum: number | null;
  /** Whether `amount` was raised from `subtotal` to the provider's minimum. */
  raisedToProviderMinimum: boolean;
}

/** No deposit: the hospital pays against its purchase order under an approved credit agreement. */
export interface DepositWaived {
  /** Whether the deposit is waived; always `true` here. */
  waived: true;
  /** The purchase order number the waiver rests on (trimmed). */
  purchaseOrderNumber: string;
}

/** Outcome of {@link depositForLoan}. */
export type LoanDeposit = DepositDue | DepositWaived;

/**
 * Checks a deposit rule and throws a {@link DepositError} (`invalid_rule` or `unknown_currency`)
 * naming the first problem.
 *
 * @param rule The rule to check.
 */
export function assertDepositRule(rule: DepositRule): void {
  currencyExponent(rule.currency);
  const { percentBps, min, max } = rule;
  if (!Number.isSafeInteger(percentBps) || percentBps < 0 || percentBps > 10_000) {
    throw new DepositError(
      'invalid_rule',
      `Deposit rule percentBps must be an integer from 0 to 10000, got ${String(percentBps)}`,
    );
  }
  for (const [label, value] of [
    ['min', min],
    ['max', max],
  ] as const) {
    if (!Number.isSafeInteger(value) || value < 0) {
      throw new DepositError(
        'invalid_rule',
        `Deposit rule ${label} must be a non-negative integer of minor units, got ${String(value)}`,
      );
    }
  }
  if (min > max) {
    throw new DepositError('invalid_rule', `Deposit rule min (${min}) exceeds max (${max})`);
  }
}

/**
 * Deposit for one unit of a model: `percentBps` of the list value, rounded half-up to whole minor
 * units, then clamped to `[rule.min, rule.max]`.
 *
 * The product is taken in BigInt because list value × basis points can pass 2^53 for expensive
 * platforms, and a float product would round before we choose how to round.
 *
 * @param listValue The model's list value, integer minor units in `rule.currency`.
 * @param rule The model's deposit rule.
 * @returns Deposit in integer minor units of `rule.currency`.
 * @throws {DepositError} `invalid_amount`, `invalid_rule` or `unknown_currency`.
 */
export function depositForModel(listValue: number, rule: DepositRule): number {
  assertInteger(listValue, 'List value', { nonNegative: true });
  assertDepositRule(rule);
  const product = BigInt(listValue) * BigInt(rule.percentBps);
  const quotient = product / BPS_PER_WHOLE;
  const remainder = product % BPS_PER_WHOLE;
  // Half-up: a remainder of exactly half a minor unit rounds away from zero (values are >= 0).
  const rounded = remainder * 2n >= BPS_PER_WHOLE ? quotient + 1n : quotient;
  const clamped = Math.min(Math.max(Number(rounded), rule.min), rule.max);
  return clamped;
}

/**
 * Deposit for a whole loan: the per-unit deposits summed, in the one currency the loan's units
 * share. Computed deposits are estimates until the lender confirms the loan.
 *
 * - Waiver: when the hospital has an approved credit agreement the deposit is waived, and a
 *   purchase order number is then required (the lender bills against it instead).
 * - Provider minimum: a positive subtotal below the payment provider's minimum charge is raised to
 *   that minimum, even past the rules' `max`. We chose raising over waiving because the deposit
 *   exists to cover damage and the provider cannot take a smaller amount; the raise is reported in
 *   `raisedToProviderMinimum`. A subtotal of 0 (rules that ask for nothing) stays 0: there is
 *   nothing to secure. For a currency missing from our copy of the provider's table no floor is
 *   applied and `providerMinimum` is `null`.
 *
 * @param units The loan's units, at least one.
 * @param terms The hospital's payment terms.
 * @returns The deposit due, or the waiver.
 * @throws {DepositError} `empty_loan`, `mixed_currencies` (units with different rule currencies),
 *   `purchase_order_required`, or any error of {@link depositForModel}.
 */
export function depositForLoan(
  units: readonly LoanUnitDepositInput[],
  terms: DepositTerms = {},
): LoanDeposit {
  if (units.length === 0) {
    throw new DepositError('empty_loan', 'A loan needs at least one unit to compute a deposit');
  }
  const currencies = [...new Set(units.map((u) => u.rule.currency))];
  if (currencies.length > 1) {
    throw new DepositError(
      'mixed_currencies',
      `All units of one loan must share one deposit currency, got ${currencies.join(', ')}; ` +
        'split the loan or align the models’ deposit rules',
    );
  }
  const currency = currencies[0];
  // Computed before the waiver check so that bad rules surface even for credit-agreement hospitals.
  const perUnit = units.map((u) => ({
    unitId: u.unitId,
    amount: depositForModel(u.listValue, u.rule),
  }));

  if (terms.hasApprovedCreditAgreement) {
    const purchaseOrderNumber = terms.purchaseOrderNumber?.trim() ?? '';
    if (purchaseOrderNumber === '') {
      throw new DepositError(
        'purchase_order_required',
        'The deposit is waived under the credit agreement only with a purchase order number',
      );
    }
    return { waived: true, purchaseOrderNumber };
  }

  const subtotal = perUnit.reduce((sum, u) => sum + u.amount, 0);
  assertInteger(subtotal, 'Deposit subtotal');
  const providerMinimum = providerMinimumCharge(currency);
  const raisedToProviderMinimum =
    providerMinimum !== null && subtotal > 0 && subtotal < providerMinimum;
  return {
    waived: false,
    currency,
    units: perUnit,
    subtotal,
    amount: raisedToProviderMinimum ? providerMinimum : subtotal,
    providerMinimum,
    raisedToProviderMinimum,
  };
}
