import type { DecisionInput, EvaluationDecision, Feedback, FeedbackInput } from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findDecision,
  findFeedback,
  upsertDecision,
  upsertFeedback,
} from '../data-access/evidence-repository';
import { assertRecording, evidenceAccess } from './access';
import type { EvidenceDeps } from './deps';
import { toDecision } from './metrics';

/** A clinician of the hospital records (or revises) their survey on the loan. */
export async function recordFeedback(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  input: FeedbackInput,
): Promise<Feedback> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const access = await evidenceAccess(m, auth, loanId, true);
    if (!access.clinician) {
      throw AppError.forbidden('forbidden', 'The survey is for the hospital’s clinicians.');
    }
    assertRecording(access.loan);
    await upsertFeedback(
      m,
      {
        loanId,
        clinicianUserId: auth.user.id,
        ratings: input.ratings,
        comment: input.comment?.trim() || null,
      },
      now,
    );
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: 'evidence.feedback_recorded',
      subject: `loan:${loanId}`,
      detail: { ratings: input.ratings },
      at: now,
    });
    const mine = (await findFeedback(m, loanId)).find((f) => f.clinicianUserId === auth.user.id)!;
    return {
      clinicianId: mine.clinicianUserId,
      clinicianName: mine.clinicianName,
      ratings: mine.ratings,
      comment: mine.comment,
      updatedAt: mine.updatedAt.toISOString(),
    };
  });
}

/** Loan states in which the buyer may record the decision: once the platform was delivered. */
const decisionStates = ['delivered', 'returning', 'returned', 'closed'];

/** A buyer of the hospital records (or revises) the decision; the trail keeps each version. */
export async function recordDecision(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  input: DecisionInput,
): Promise<EvaluationDecision> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const access = await evidenceAccess(m, auth, loanId, true);
    if (!access.buyer) {
      throw AppError.forbidden('forbidden', 'The hospital’s buyers record the decision.');
    }
    if (!decisionStates.includes(access.loan.state)) {
      throw AppError.conflict(
        'evaluation_not_open',
        `The decision follows the evaluation; this loan is ${access.loan.state}.`,
        { state: access.loan.state },
      );
    }
    const reasons = [...input.reasons];
    await upsertDecision(m, {
      loanId,
      decision: input.decision,
      reasons,
      note: input.note?.trim() || null,
      decidedByUserId: auth.user.id,
      decidedAt: now,
    });
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: 'evidence.decision_recorded',
      subject: `loan:${loanId}`,
      detail: { decision: input.decision, reasons },
      at: now,
    });
    return toDecision((await findDecision(m, loanId))!);
  });
}
