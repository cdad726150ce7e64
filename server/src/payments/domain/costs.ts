import type { EntityManager } from 'typeorm';
import { findLoanDeposit } from '../data-access/loan-deposit-repository';
import { findLoanPayments } from '../data-access/payment-repository';
import type { DepositSettlement } from './settlement';

/** What the hospital paid or owes for a loan, as payments knows it (integer minor units). */
export interface LoanCostsSeen {
  /** The deposit set for the loan at booking. */
  deposit: { amount: number; currency: string };
  /** How the deposit was secured (`hold`, `charge`, `waived`), or null while not secured. */
  securedAs: 'hold' | 'charge' | 'waived' | null;
  /** Whether the deposit was settled after the return inspection. */
  settled: boolean;
  /** Charges from the settlement (inspection findings and other charges), in order. */
  charges: { reason: string; amount: number }[];
  /** Kept from the deposit for the charges; 0 before settlement. */
  kept: number;
  /** Given back to the hospital; 0 before settlement. */
  returned: number;
  /** Charges beyond the deposit, invoiced separately; 0 before settlement. */
  uncovered: number;
}

/**
 * The deposit and settlement charges of a loan, for reports (evaluation evidence). A read only:
 * the securing payment row and its stored settlement, or the booked deposit when none exists.
 */
export async function loanCostsSeen(
  m: EntityManager,
  loanId: number,
): Promise<LoanCostsSeen | null> {
  const loan = await findLoanDeposit(m, loanId);
  if (!loan) return null;
  const payment = (await findLoanPayments(m, loanId)).find((p) => p.securesLoan) ?? null;
  const settlement = (payment?.settlement ?? null) as DepositSettlement | null;
  return {
    deposit: { amount: loan.depositAmount, currency: loan.depositCurrency },
    securedAs: payment ? payment.kind : null,
    settled: Boolean(payment?.settledAt),
    charges: (settlement?.allocations ?? []).map((a) => ({ reason: a.reason, amount: a.amount })),
    kept: settlement?.kept ?? 0,
    returned: settlement?.returned ?? 0,
    uncovered: settlement?.uncovered ?? 0,
  };
}
