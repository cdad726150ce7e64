import type { EntityManager } from 'typeorm';
import type { LoanState } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { isBuyerOf, worksForLender } from '../../catalog';
import {
  findEvidenceLoan,
  findLinkedVisits,
  findSharing,
  type EvidenceLoan,
  type LinkedVisit,
} from '../data-access/evidence-repository';

/** How the person takes part in a loan's evaluation evidence. */
export interface EvidenceAccess {
  loan: EvidenceLoan;
  visits: LinkedVisit[];
  /** Whether the person is a clinician of the loan's hospital. */
  clinician: boolean;
  /** The person's own visits on this loan as its proctor (empty for others). */
  proctorVisits: LinkedVisit[];
  /** Whether the person is a buyer of the loan's hospital. */
  buyer: boolean;
  /** Whether the person may add, change and remove cases (clinicians and the loan's proctors). */
  canRecord: boolean;
  /** Whether the person reads as the lender, by the hospital's consent (report routes only). */
  lender: boolean;
}

/** Loan states in which cases and surveys are recorded: from delivery until it is back. */
export const recordingStates: readonly LoanState[] = ['delivered', 'returning', 'returned'];

/**
 * Who may see a loan's evidence: the hospital's buyers and clinicians, proctors of visits linked
 * to the loan, and the platform admin. Anyone else gets 404 (ids of other organisations' loans
 * reveal nothing). The lender's people see the loan itself but not its case records: those are
 * the hospital's until a consent to share them exists (403, said plainly).
 */
export async function evidenceAccess(
  m: EntityManager,
  auth: AuthContext,
  loanId: number,
  lock = false,
  /** Whether the lender's people may read here when the hospital shared the report. */
  lenderByConsent = false,
): Promise<EvidenceAccess> {
  const loan = await findEvidenceLoan(m, loanId, lock);
  if (!loan) throw AppError.notFound('loan_not_found', 'There is no such loan.');
  const visits = await findLinkedVisits(m, loanId);
  const clinician = auth.user.memberships.some(
    (ms) => ms.organisationId === loan.hospitalId && ms.role === 'clinician',
  );
  const buyer = isBuyerOf(auth, loan.hospitalId);
  const proctorVisits = visits.filter((v) => v.proctorUserId === auth.user.id);
  if (!clinician && !buyer && proctorVisits.length === 0 && !auth.isPlatformAdmin) {
    if (worksForLender(auth, loan.lenderId)) {
      if (lenderByConsent && (await findSharing(m, loanId))?.sharedWithLender) {
        return { loan, visits, clinician, proctorVisits, buyer, canRecord: false, lender: true };
      }
      throw AppError.forbidden(
        'evidence_not_shared',
        'Case records belong to the hospital; they are not shared with the lender.',
      );
    }
    throw AppError.notFound('loan_not_found', 'There is no such loan.');
  }
  return {
    loan,
    visits,
    clinician,
    proctorVisits,
    buyer,
    canRecord: clinician || proctorVisits.length > 0,
    lender: false,
  };
}

/** Refuses (403) unless the person may record cases on the loan. */
export function assertCanRecord(access: EvidenceAccess): void {
  if (!access.canRecord) {
    throw AppError.forbidden(
      'forbidden',
      'Only the hospital’s clinicians and the loan’s proctors record cases.',
    );
  }
}

/** Refuses (409) outside the loan states in which the evaluation runs. */
export function assertRecording(loan: EvidenceLoan): void {
  if (!recordingStates.includes(loan.state)) {
    throw AppError.conflict(
      'evaluation_not_open',
      `Cases are recorded once the loan is delivered and until it is back at the depot; this loan is ${loan.state}.`,
      { state: loan.state },
    );
  }
}
