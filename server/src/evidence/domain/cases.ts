import type { EntityManager } from 'typeorm';
import {
  caseRecordCaution,
  type CaseInput,
  type CaseList,
  type CasePatch,
  type EvaluationCase,
} from '@evalon/contracts';
import { deriveCase, procedureLabels, proceduresFor } from '@evalon/evidence';
import { insertAuditEvent } from '../../audit';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  deleteCase,
  findCases,
  findHospitalClinicians,
  insertCase,
  updateCase,
  type CaseView,
  type NewCase,
} from '../data-access/evidence-repository';
import {
  assertCanRecord,
  assertRecording,
  evidenceAccess,
  recordingStates,
  type EvidenceAccess,
} from './access';
import type { EvidenceDeps } from './deps';

/** Stored to a tenth (DECIMAL(…,1)); rounding here keeps the answer equal to what is read back. */
const tenth = (x: number) => Math.round(x * 10) / 10;
const tenthOrNull = (x: number | null | undefined) => (x == null ? null : tenth(x));

/** The API shape of a case, with volume and ablation rate computed from what is stored. */
export function toCase(row: CaseView): EvaluationCase {
  const target =
    row.targetLengthMm != null && row.targetWidthMm != null && row.targetHeightMm != null
      ? { lengthMm: row.targetLengthMm, widthMm: row.targetWidthMm, heightMm: row.targetHeightMm }
      : null;
  const derived = deriveCase({ target, energyMinutes: row.energyMinutes });
  return {
    id: row.id,
    loanId: row.loanId,
    caseNumber: row.caseNumber,
    evaluationDay: row.evaluationDay,
    procedure: row.procedure,
    unitIds: row.unitIds,
    clinicianId: row.clinicianUserId,
    clinicianName: row.clinicianName,
    setupMinutes: row.setupMinutes,
    operativeMinutes: row.operativeMinutes,
    energyMinutes: row.energyMinutes,
    target,
    outcome: row.outcome,
    complicationGrade: row.complicationGrade,
    visitId: row.visitId,
    proctored: row.visitId != null,
    deviceIssues: row.deviceIssues,
    note: row.note,
    recordedByUserId: row.recordedByUserId,
    recordedByName: row.recordedByName,
    targetVolumeMm3: derived.targetVolumeMm3,
    ablationRateMm3PerMin: derived.ablationRateMm3PerMin,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

/** The loan's cases with what the form offers. */
export async function listCases(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
): Promise<CaseList> {
  const m = deps.dataSource.manager;
  const access = await evidenceAccess(m, auth, loanId);
  const [rows, clinicians] = await Promise.all([
    findCases(m, loanId),
    findHospitalClinicians(m, access.loan.hospitalId),
  ]);
  return {
    items: rows.map(toCase),
    options: {
      procedures: proceduresFor(access.loan.units.map((u) => u.category)),
      units: access.loan.units.map((u) => ({
        unitId: u.unitId,
        label: `${u.modelName} · ${u.serialNumber}`,
      })),
      clinicians,
      visits: access.visits.map((v) => ({
        visitId: v.id,
        label: `${v.reference} · ${v.proctorName}`,
      })),
    },
    canRecord: access.canRecord && recordingStates.includes(access.loan.state),
    caution: caseRecordCaution,
  };
}

type References = Partial<Pick<CaseInput, 'unitIds' | 'procedure' | 'clinicianId' | 'visitId'>>;

/**
 * Checks the fields that name other things against the loan: its units, the procedure families
 * of its categories, the hospital's clinicians and the visits linked to the loan. Returns the
 * clinician and visit to store (a clinician recording their own case need not say who; a
 * proctor's case is linked to their visit unless they name another of theirs).
 */
async function checkReferences(
  m: EntityManager,
  auth: AuthContext,
  access: EvidenceAccess,
  input: References,
  current?: CaseView,
): Promise<{ clinicianUserId: number; visitId: number | null }> {
  const loanUnits = new Set(access.loan.units.map((u) => u.unitId));
  const foreign = (input.unitIds ?? []).filter((u) => !loanUnits.has(u));
  if (foreign.length > 0) {
    throw AppError.field(
      'unknown_units',
      'unitIds',
      `Unit ${foreign.join(', ')} is not part of this loan.`,
    );
  }
  if (input.procedure !== undefined) {
    const offered = proceduresFor(access.loan.units.map((u) => u.category));
    if (!offered.includes(input.procedure)) {
      throw AppError.field(
        'procedure_not_offered',
        'procedure',
        `${procedureLabels[input.procedure] ?? input.procedure} is not a procedure for the equipment on this loan.`,
      );
    }
  }
  let clinicianUserId = input.clinicianId ?? current?.clinicianUserId;
  if (clinicianUserId === undefined) {
    if (!access.clinician) {
      throw AppError.field(
        'clinician_required',
        'clinicianId',
        'Choose the clinician who performed the case.',
      );
    }
    clinicianUserId = auth.user.id;
  }
  if (input.clinicianId !== undefined) {
    const clinicians = await findHospitalClinicians(m, access.loan.hospitalId);
    if (!clinicians.some((c) => c.userId === input.clinicianId)) {
      throw AppError.field(
        'unknown_clinician',
        'clinicianId',
        'Choose a clinician of the loan’s hospital.',
      );
    }
  }
  let visitId = input.visitId === undefined ? (current?.visitId ?? null) : input.visitId;
  const proctorOnly = !access.clinician && access.proctorVisits.length > 0;
  if (visitId === null && proctorOnly && !current) {
    // A proctor's case is a proctored case: link it to their (latest) visit on this loan.
    visitId = access.proctorVisits[access.proctorVisits.length - 1]!.id;
  }
  if (visitId !== null && input.visitId != null) {
    const allowed = proctorOnly ? access.proctorVisits : access.visits;
    if (!allowed.some((v) => v.id === visitId)) {
      throw AppError.field(
        'unknown_visit',
        'visitId',
        proctorOnly
          ? 'Link the case to one of your visits on this loan.'
          : 'Link the case to a proctoring visit of this loan.',
      );
    }
  }
  return { clinicianUserId, visitId };
}

async function assertNumberFree(
  m: EntityManager,
  loanId: number,
  caseNumber: number,
  exceptId?: number,
) {
  const taken = (await findCases(m, loanId)).some(
    (c) => c.caseNumber === caseNumber && c.id !== exceptId,
  );
  if (taken) {
    throw AppError.conflict(
      'case_number_taken',
      `Case ${caseNumber} of this evaluation is already recorded.`,
      { caseNumber },
    );
  }
}

/**
 * A proctor who is not one of the hospital's clinicians changes and removes only the cases of
 * their own visits; clinicians change any case of the loan (403 otherwise).
 */
function assertMayChange(access: EvidenceAccess, current: CaseView): void {
  if (access.clinician) return;
  if (access.proctorVisits.some((v) => v.id === current.visitId)) return;
  throw AppError.forbidden(
    'forbidden',
    'A proctor changes only the cases of their own visits; the hospital’s clinicians change the rest.',
  );
}

/** Fields as stored, from the input (only those present in a patch). */
function toColumns(input: CasePatch): Partial<NewCase> {
  const out: Partial<NewCase> = {};
  if (input.caseNumber !== undefined) out.caseNumber = input.caseNumber;
  if (input.evaluationDay !== undefined) out.evaluationDay = input.evaluationDay;
  if (input.procedure !== undefined) out.procedure = input.procedure;
  if (input.unitIds !== undefined) out.unitIds = [...new Set(input.unitIds)].sort((a, b) => a - b);
  if (input.setupMinutes !== undefined) out.setupMinutes = tenth(input.setupMinutes);
  if (input.operativeMinutes !== undefined) out.operativeMinutes = tenth(input.operativeMinutes);
  if (input.energyMinutes !== undefined) out.energyMinutes = tenthOrNull(input.energyMinutes);
  if (input.target !== undefined) {
    out.targetLengthMm = tenthOrNull(input.target?.lengthMm);
    out.targetWidthMm = tenthOrNull(input.target?.widthMm);
    out.targetHeightMm = tenthOrNull(input.target?.heightMm);
  }
  if (input.outcome !== undefined) out.outcome = input.outcome ?? null;
  if (input.complicationGrade !== undefined)
    out.complicationGrade = input.complicationGrade ?? null;
  if (input.deviceIssues !== undefined) out.deviceIssues = input.deviceIssues?.trim() || null;
  if (input.note !== undefined) out.note = input.note?.trim() || null;
  return out;
}

async function readCase(m: EntityManager, loanId: number, caseId: number): Promise<EvaluationCase> {
  const [row] = await findCases(m, loanId, caseId);
  if (!row) throw AppError.notFound('case_not_found', 'There is no such case on this loan.');
  return toCase(row);
}

/** Records a case (clinicians of the hospital and the loan's proctors). */
export async function recordCase(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  input: CaseInput,
): Promise<EvaluationCase> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    // The loan row lock serialises recordings on one loan (case numbers).
    const access = await evidenceAccess(m, auth, loanId, true);
    assertCanRecord(access);
    assertRecording(access.loan);
    const refs = await checkReferences(m, auth, access, input);
    await assertNumberFree(m, loanId, input.caseNumber);
    const columns = toColumns(input) as NewCase;
    const caseId = await insertCase(
      m,
      {
        ...columns,
        energyMinutes: columns.energyMinutes ?? null,
        targetLengthMm: columns.targetLengthMm ?? null,
        targetWidthMm: columns.targetWidthMm ?? null,
        targetHeightMm: columns.targetHeightMm ?? null,
        outcome: columns.outcome ?? null,
        complicationGrade: columns.complicationGrade ?? null,
        deviceIssues: columns.deviceIssues ?? null,
        note: columns.note ?? null,
        loanId,
        clinicianUserId: refs.clinicianUserId,
        visitId: refs.visitId,
        recordedByUserId: auth.user.id,
      },
      now,
    );
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: 'evidence.case_recorded',
      subject: `loan:${loanId}/case:${caseId}`,
      detail: { caseNumber: input.caseNumber, proctored: refs.visitId != null },
      at: now,
    });
    return readCase(m, loanId, caseId);
  });
}

/** Changes some fields of a case; the same checks as recording. */
export async function changeCase(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  caseId: number,
  patch: CasePatch,
): Promise<EvaluationCase> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const access = await evidenceAccess(m, auth, loanId, true);
    assertCanRecord(access);
    const [current] = await findCases(m, loanId, caseId, true);
    if (!current) throw AppError.notFound('case_not_found', 'There is no such case on this loan.');
    assertMayChange(access, current);
    assertRecording(access.loan);
    // Energy time against operative time, when only one of them changes.
    const energy = patch.energyMinutes !== undefined ? patch.energyMinutes : current.energyMinutes;
    const operative = patch.operativeMinutes ?? current.operativeMinutes;
    if (energy != null && energy > operative) {
      throw AppError.field(
        'validation_failed',
        'energyMinutes',
        'The energy-on time is part of the operative time and cannot be longer.',
      );
    }
    const refs = await checkReferences(m, auth, access, patch, current);
    if (patch.caseNumber !== undefined) await assertNumberFree(m, loanId, patch.caseNumber, caseId);
    const columns = {
      ...toColumns(patch),
      clinicianUserId: refs.clinicianUserId,
      visitId: refs.visitId,
    };
    await updateCase(m, caseId, columns, now);
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: 'evidence.case_changed',
      subject: `loan:${loanId}/case:${caseId}`,
      // Field names only: the values may be free text.
      detail: {
        caseNumber: patch.caseNumber ?? current.caseNumber,
        fields: Object.keys(patch).sort(),
      },
      at: now,
    });
    return readCase(m, loanId, caseId);
  });
}

/** Removes a case. */
export async function removeCase(
  deps: EvidenceDeps,
  auth: AuthContext,
  loanId: number,
  caseId: number,
): Promise<void> {
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    const access = await evidenceAccess(m, auth, loanId, true);
    assertCanRecord(access);
    const [current] = await findCases(m, loanId, caseId, true);
    if (!current) throw AppError.notFound('case_not_found', 'There is no such case on this loan.');
    assertMayChange(access, current);
    assertRecording(access.loan);
    await deleteCase(m, caseId);
    await insertAuditEvent(m, {
      actorUserId: auth.user.id,
      organisationId: access.loan.hospitalId,
      action: 'evidence.case_removed',
      subject: `loan:${loanId}/case:${caseId}`,
      detail: { caseNumber: current.caseNumber },
      at: now,
    });
  });
}
