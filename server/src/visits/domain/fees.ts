import type { EntityManager } from 'typeorm';
import type { VisitState } from '@evalon/contracts';
import { VisitEntity } from '../data-access/entities';

/** A proctoring visit tied to a loan, with its agreed fee (integer minor units). */
export interface LoanVisitFee {
  visitId: number;
  reference: string;
  state: VisitState;
  /** The fee agreed for the visit, or null when none was set. */
  fee: { amount: number; currency: string } | null;
}

/** Visit states that cost nothing: the visit never took place. */
const unpaidStates: readonly VisitState[] = ['cancelled', 'unfilled'];

/**
 * The proctor fees of the visits linked to a loan, for reports (evaluation evidence). Visits that
 * did not go ahead are left out.
 */
export async function loanVisitFees(m: EntityManager, loanId: number): Promise<LoanVisitFee[]> {
  const rows = await m.find(VisitEntity, { where: { loanId }, order: { id: 'ASC' } });
  return rows
    .filter((v) => !unpaidStates.includes(v.state as VisitState))
    .map((v) => ({
      visitId: v.id,
      reference: v.reference,
      state: v.state as VisitState,
      fee:
        v.feeAmount !== null && v.feeCurrency
          ? { amount: Number(v.feeAmount), currency: v.feeCurrency }
          : null,
    }));
}
