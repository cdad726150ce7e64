import {
  feedbackItemShortLabels,
  reportCaution,
  type EvaluationCase,
  type EvaluationReport,
  type EvidenceSharing,
  type SharingInput,
} from '@evalon/contracts';
import { ablationRateChart, operativeTimeChart, surveyChart } from '@evalon/evidence';
import type { EntityManager } from 'typeorm';
import { insertAuditEvent } from '../../audit';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import { loanCostsSeen } from '../../payments';
import { loanVisitFees } from '../../visits';
import {
  findSharing,
  organisationNames,
  upsertSharing,
  userName,
} from '../data-access/evidence-repository';
import { evidenceAccess, type EvidenceAccess } from './access';
import type { EvidenceDeps } from './deps';
import { metricsOf } from './metrics';

/**
 * The lender reads clinicians as "Clinician 1", "Clinician 2", … (in order of first case): the
 * consent shares the evaluation, not the hospital's staff list.
 */
function pseudonymise(cases: EvaluationCase[]): Map<number, string> {
  const names = new Map<number, string>();
  for (const c of [...cases].sort((x, y) => x.caseNumber - y.caseNumber)) {
    if (!names.has(c.clinicianId)) names.set(c.clinicianId, `Clinician ${names.size + 1}`);
  }
  return names;
}

async function sharingOf(m: EntityManager, loanId: number): Promise<EvidenceSharing> {
  const row = await findSharing(m, loanId);
  return {
    sharedWithLender: row?.sharedWithLender ?? false,
    changedByName: row ? await userName(m, row.changedByUserId) : null,
    changedAt: row ? row.changedAt.toISOString() : null,
  };
}

/** The report of a loan the person may read (lender included, when the hospital consented). */
export async function reportFor(
  m: EntityManager,
  access: EvidenceAccess,
): Promise<{ report: EvaluationReport; cases: EvaluationCase[] }> {
  const loan = access.loan;
  const [{ metrics, cases: stored }, costs, fees, names, sharing] = await Promise.all([
    metricsOf(m, access),
    loanCostsSeen(m, loan.id),
    loanVisitFees(m, loan.id),
    organisationNames(m, [loan.hospitalId, loan.lenderId]),
    sharingOf(m, loan.id),
  ]);
  let cases = stored;
  let perClinician = metrics.perClinician;
  if (access.lender) {
    const pseudonyms = pseudonymise(stored);
    const named = (id: number) => pseudonyms.get(id) ?? 'Clinician';
    cases = stored.map((c) => ({ ...c, clinicianName: named(c.clinicianId), recordedByName: '' }));
    perClinician = perClinician.map((p) => ({ ...p, clinicianName: named(p.clinicianId) }));
  }
  const curves = perClinician.flatMap((p) =>
    p.curve ? [{ clinicianId: p.clinicianId, ...p.curve }] : [],
  );
  const charts = [
    operativeTimeChart(cases, curves),
    ablationRateChart(cases),
    surveyChart(
      metrics.feedback.items.map((i) => ({
        label: feedbackItemShortLabels[i.item],
        n: i.summary?.n ?? 0,
        median: i.summary?.median ?? null,
        mean: i.summary?.mean ?? null,
      })),
      metrics.feedback.responses,
    ),
  ];
  const decision =
    access.lender && metrics.decision
      ? { ...metrics.decision, decidedByName: '', decidedByUserId: 0 }
      : metrics.decision;
  const report: EvaluationReport = {
    loan: {
      id: loan.id,
      reference: loan.reference,
      state: loan.state,
      hospitalName: names.get(loan.hospitalId) ?? '',
      lenderName: names.get(loan.lenderId) ?? '',
      units: loan.units.map((u) => ({ modelName: u.modelName, serialNumber: u.serialNumber })),
    },
    readAsLender: access.lender,
    canDecide: access.buyer,
    // The lender learns that the hospital shared, not which buyer did.
    sharing: access.lender ? { ...sharing, changedByName: null } : sharing,
    metrics: { ...metrics, perClinician, decision },
    charts,
    costs: {
      deposit: costs?.deposit ?? { amount: 0, currency: 'USD' },
      securedAs: costs?.securedAs ?? null,
      settled: costs?.settled ?? false,
      charges: costs?.charges ?? [],
      kept: costs?.kept ?? 0,
      returned: costs?.returned ?? 0,
      uncovered: costs?.uncovered ?? 0,
      proctorFees: fees.map((f) => ({ reference: f.reference, state: f.state, fee: f.fee })),
    },
    caution: reportCaution,
  };
  return { report, cases };
}

/** `GET /api/loans/:id/report` (and the source of the PDF and the CSV). */
export async function getReport(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
): Promise<{ report: EvaluationReport; cases: EvaluationCase[] }> {
  const m = deps.dataSource.manager;
  const access = await evidenceAccess(m, auth, loanId, false, true);
  return reportFor(m, access);
}

/** A buyer of the hospital shares the report with the lender, or stops sharing it; audited. */
export async function setSharing(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  input: SharingInput,
): Promise<EvidenceSharing> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const access = await evidenceAccess(m, auth, loanId, true);
    if (!access.buyer) {
      throw AppError.forbidden(
        'forbidden',
        'Only the hospital’s buyers decide whether the lender sees the evaluation report.',
      );
    }
    await upsertSharing(m, {
      loanId,
      sharedWithLender: input.sharedWithLender,
      changedByUserId: auth.user.id,
      changedAt: now,
    });
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: input.sharedWithLender ? 'evidence.shared_with_lender' : 'evidence.sharing_withdrawn',
      subject: `loan:${loanId}`,
      detail: { sharedWithLender: input.sharedWithLender },
      at: now,
    });
    return sharingOf(m, loanId);
  });
}
