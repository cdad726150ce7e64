import { DepositError } from './errors';
import { assertInteger } from './money';

/** A charge found at return inspection (or otherwise owed), in the deposit's currency. */
export interface Charge {
  /** Why it is charged, for the hospital's statement (e.g. "cracked housing"). */
  reason: string;
  /** Integer minor units, not negative. */
  amount: number;
}

/** How one charge was met: from the deposit, and what is left to invoice. */
export interface ChargeAllocation extends Charge {
  /** Part of the charge taken from the deposit, integer minor units. */
  deducted: number;
  /** Part of the charge the deposit did not cover, integer minor units. */
  uncovered: number;
}

/** Outcome of {@link settle}. All amounts are integer minor units of the deposit's currency. */
export interface Settlement {
  /** Kept from the deposit for the charges; never more than was paid. */
  deducted: number;
  /** Returned to the hospital: paid − deducted. */
  refund: number;
  /** Charges beyond what was paid, to be invoiced separately. */
  uncovered: number;
  /** Per-charge split, in the order given (earlier charges are met first). */
  allocations: ChargeAllocation[];
}

/** Outcome of {@link settleHold}. All amounts are integer minor units of the deposit's currency. */
export interface HoldSettlement {
  /** Amount to capture from the authorisation; never more than was authorised. */
  capture: number;
  /** Part of the authorisation released to the hospital: authorised − capture. */
  release: number;
  /** Charges beyond what was authorised, to be invoiced separately. */
  uncovered: number;
  /**
   * Whether nothing is to be captured, so the caller cancels the authorisation rather than
   * capturing a zero amount.
   */
  cancelAuthorisation: boolean;
  /** Per-charge split, in the order given (earlier charges are met first). */
  allocations: ChargeAllocation[];
}

/** Splits the charges against what is available; shared by both strategies. */
function allocate(available: number, charges: readonly Charge[]) {
  let left = available;
  const allocations = charges.map((charge, i): ChargeAllocation => {
    if (typeof charge.reason !== 'string' || charge.reason.trim() === '') {
      throw new DepositError('invalid_charge', `Charge #${i + 1} needs a reason`);
    }
    assertInteger(charge.amount, `Charge #${i + 1} (${charge.reason}) amount`, {
      nonNegative: true,
    });
    const deducted = Math.min(charge.amount, left);
    left -= deducted;
    return { ...charge, deducted, uncovered: charge.amount - deducted };
  });
  const total = charges.reduce((sum, c) => sum + c.amount, 0);
  assertInteger(total, 'Sum of charges');
  return { allocations, covered: available - left, uncovered: total - (available - left) };
}

/**
 * Settles a deposit that was charged up front: inspection and other charges are deducted, never
 * more than was paid; the rest is refunded; charges beyond the deposit are reported as
 * `uncovered` for a separate invoice.
 *
 * @param input `paid`: the deposit charged, integer minor units; `charges`: what is owed.
 * @returns Deducted, refund, uncovered and the per-charge split.
 * @throws {DepositError} `invalid_amount` or `invalid_charge`.
 */
export function settle(input: { paid: number; charges: readonly Charge[] }): Settlement {
  assertInteger(input.paid, 'Paid deposit', { nonNegative: true });
  const { allocations, covered, uncovered } = allocate(input.paid, input.charges);
  return { deducted: covered, refund: input.paid - covered, uncovered, allocations };
}

/**
 * Settles a deposit secured as an authorisation hold: captures the charges up to the authorised
 * amount and releases the rest; charges beyond the authorisation are reported as `uncovered` for
 * a separate invoice.
 *
 * @param input `authorised`: the amount held, integer minor units; `charges`: what is owed.
 * @returns Capture, release, uncovered, whether to cancel instead of capturing, and the split.
 * @throws {DepositError} `invalid_amount` or `invalid_charge`.
 */
export function settleHold(input: {
  authorised: number;
  charges: readonly Charge[];
}): HoldSettlement {
  assertInteger(input.authorised, 'Authorised deposit', { nonNegative: true });
  const { allocations, covered, uncovered } = allocate(input.authorised, input.charges);
  return {
    capture: covered,
    release: input.authorised - covered,
    uncovered,
    cancelAuthorisation: covered === 0,
    allocations,
  };
}
