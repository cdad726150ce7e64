import {
  feedbackItems,
  type EvaluationCase,
  type EvaluationDecision,
  type LoanMetricsResponse,
} from '@evalon/contracts';
import { loanMetrics, quantileMethod, summarise } from '@evalon/evidence';
import type { EntityManager } from 'typeorm';
import type { AuthContext } from '../../identity';
import { findCases, findDecision, findFeedback } from '../data-access/evidence-repository';
import { evidenceAccess, type EvidenceAccess } from './access';
import { toCase } from './cases';
import type { EvidenceDeps } from './deps';

/** The loan's evaluation figures: computed by `@evalon/evidence` from the stored cases. */
export async function getMetrics(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
): Promise<LoanMetricsResponse> {
  const m = deps.dataSource.manager;
  const access = await evidenceAccess(m, auth, loanId);
  return (await metricsOf(m, access)).metrics;
}

/**
 * The figures of a loan the person may see, with the cases they were computed from (the report
 * draws its charts from both).
 */
export async function metricsOf(
  m: EntityManager,
  access: EvidenceAccess,
): Promise<{ metrics: LoanMetricsResponse; cases: EvaluationCase[] }> {
  const loanId = access.loan.id;
  const [rows, surveys, decision] = await Promise.all([
    findCases(m, loanId),
    findFeedback(m, loanId),
    findDecision(m, loanId),
  ]);
  const cases = rows.map(toCase);
  const names = new Map(cases.map((c) => [c.clinicianId, c.clinicianName]));
  const metrics = loanMetrics(
    cases.map((c) => ({
      caseNumber: c.caseNumber,
      clinicianId: c.clinicianId,
      setupMinutes: c.setupMinutes,
      operativeMinutes: c.operativeMinutes,
      energyMinutes: c.energyMinutes,
      target: c.target,
      complicationGrade: c.complicationGrade,
      proctored: c.proctored,
    })),
    access.loan.signOffThreshold,
  );
  const response: LoanMetricsResponse = {
    ...metrics,
    quantileMethod,
    perClinician: metrics.perClinician.map((p) => ({
      ...p,
      clinicianName: names.get(p.clinicianId) ?? '',
    })),
    feedback: {
      responses: surveys.length,
      items: feedbackItems.map((item) => ({
        item,
        summary: summarise(surveys.map((s) => s.ratings[item])),
      })),
    },
    decision: decision ? toDecision(decision) : null,
  };
  return { metrics: response, cases };
}

/** The API shape of a decision. */
export function toDecision(
  row: NonNullable<Awaited<ReturnType<typeof findDecision>>>,
): EvaluationDecision {
  return {
    decision: row.decision,
    reasons: row.reasons,
    note: row.note,
    decidedByUserId: row.decidedByUserId,
    decidedByName: row.decidedByName,
    decidedAt: row.decidedAt.toISOString(),
  };
}
