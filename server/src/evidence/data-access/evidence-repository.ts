// Reads of other components' tables here are plain SQL joins for display and scope (loans, their
// units and models, memberships, visits linked to the loan), as the visits repository does; this
// component writes only its own tables.
import type { EntityManager } from 'typeorm';
import type { LoanState } from '@evalon/contracts';
import {
  EvaluationCaseEntity,
  EvaluationDecisionEntity,
  EvaluationFeedbackEntity,
  EvaluationSharingEntity,
  type EvaluationCaseRow,
  type EvaluationDecisionRow,
  type EvaluationFeedbackRow,
  type EvaluationSharingRow,
} from './entities';

/** What the evidence component needs of a loan. */
export interface EvidenceLoan {
  id: number;
  reference: string;
  state: LoanState;
  hospitalId: number;
  lenderId: number;
  /** The hospital's number of proctored cases before sign-off. */
  signOffThreshold: number;
  units: { unitId: number; modelName: string; serialNumber: string; category: string }[];
}

/** The loan with its units; `lock` takes the loan row FOR UPDATE (serialises case numbers). */
export async function findEvidenceLoan(
  m: EntityManager,
  loanId: number,
  lock = false,
): Promise<EvidenceLoan | null> {
  const [row] = (await m.query(
    `SELECT l.id, l.reference, l.state, l.hospital_id AS hospitalId, l.lender_id AS lenderId,
            o.sign_off_threshold AS threshold
       FROM loans l JOIN organisations o ON o.id = l.hospital_id
      WHERE l.id = ?${lock ? ' FOR UPDATE' : ''}`,
    [loanId],
  )) as Record<string, unknown>[];
  if (!row) return null;
  const units = (await m.query(
    `SELECT lu.unit_id AS unitId, mo.name AS modelName, u.serial_number AS serialNumber,
            mo.category
       FROM loan_units lu JOIN units u ON u.id = lu.unit_id JOIN models mo ON mo.id = lu.model_id
      WHERE lu.loan_id = ? ORDER BY lu.unit_id`,
    [loanId],
  )) as Record<string, unknown>[];
  return {
    id: Number(row.id),
    reference: String(row.reference),
    state: row.state as LoanState,
    hospitalId: Number(row.hospitalId),
    lenderId: Number(row.lenderId),
    signOffThreshold: Number(row.threshold),
    units: units.map((u) => ({
      unitId: Number(u.unitId),
      modelName: String(u.modelName),
      serialNumber: String(u.serialNumber),
      category: String(u.category),
    })),
  };
}

/** A proctoring visit tied to the loan that a proctor took on. */
export interface LinkedVisit {
  id: number;
  reference: string;
  proctorUserId: number;
  proctorName: string;
}

/** Visits linked to the loan with a proctor who accepted (accepted, completed or signed off). */
export async function findLinkedVisits(m: EntityManager, loanId: number): Promise<LinkedVisit[]> {
  const rows = (await m.query(
    `SELECT v.id, v.reference, v.proctor_user_id AS proctorUserId, u.name AS proctorName
       FROM visits v JOIN users u ON u.id = v.proctor_user_id
      WHERE v.loan_id = ? AND v.proctor_user_id IS NOT NULL
        AND v.state IN ('accepted', 'completed', 'signed_off')
      ORDER BY v.id`,
    [loanId],
  )) as Record<string, unknown>[];
  return rows.map((r) => ({
    id: Number(r.id),
    reference: String(r.reference),
    proctorUserId: Number(r.proctorUserId),
    proctorName: String(r.proctorName),
  }));
}

/** Active clinicians of the hospital, by name. */
export async function findHospitalClinicians(
  m: EntityManager,
  hospitalId: number,
): Promise<{ userId: number; name: string }[]> {
  const rows = (await m.query(
    `SELECT DISTINCT u.id AS userId, u.name FROM memberships ms JOIN users u ON u.id = ms.user_id
      WHERE ms.organisation_id = ? AND ms.role = 'clinician' AND u.active = 1 ORDER BY u.name, u.id`,
    [hospitalId],
  )) as Record<string, unknown>[];
  return rows.map((r) => ({ userId: Number(r.userId), name: String(r.name) }));
}

/** A case row with the names the screens show. */
export type CaseView = EvaluationCaseRow & { clinicianName: string; recordedByName: string };

/** The loan's cases by case number (one case when `caseId` is given). */
export async function findCases(
  m: EntityManager,
  loanId: number,
  caseId?: number,
  lock = false,
): Promise<CaseView[]> {
  const qb = m
    .createQueryBuilder(EvaluationCaseEntity, 'c')
    .where('c.loanId = :loanId', { loanId })
    .orderBy('c.caseNumber', 'ASC');
  if (caseId !== undefined) qb.andWhere('c.id = :caseId', { caseId });
  if (lock) qb.setLock('pessimistic_write');
  const rows = await qb.getMany();
  const ids = [...new Set(rows.flatMap((r) => [r.clinicianUserId, r.recordedByUserId]))];
  const names = await userNames(m, ids);
  return rows.map((r) => ({
    ...r,
    unitIds: (typeof r.unitIds === 'string' ? JSON.parse(r.unitIds) : r.unitIds) as number[],
    clinicianName: names.get(r.clinicianUserId) ?? '',
    recordedByName: names.get(r.recordedByUserId) ?? '',
  }));
}

async function userNames(m: EntityManager, ids: number[]): Promise<Map<number, string>> {
  if (ids.length === 0) return new Map();
  const rows = (await m.query(`SELECT id, name FROM users WHERE id IN (?)`, [ids])) as {
    id: number;
    name: string;
  }[];
  return new Map(rows.map((r) => [Number(r.id), String(r.name)]));
}

export type NewCase = Omit<EvaluationCaseRow, 'id' | 'createdAt' | 'updatedAt'>;

/** Inserts a case; returns its id. */
export async function insertCase(m: EntityManager, row: NewCase, now: Date): Promise<number> {
  const result = await m.insert(EvaluationCaseEntity, { ...row, createdAt: now, updatedAt: now });
  return Number(result.identifiers[0]?.id);
}

/** Changes a case's fields. */
export async function updateCase(
  m: EntityManager,
  id: number,
  changes: Partial<NewCase>,
  now: Date,
): Promise<void> {
  await m.update(EvaluationCaseEntity, { id }, { ...changes, updatedAt: now } as never);
}

/** Deletes a case. */
export async function deleteCase(m: EntityManager, id: number): Promise<void> {
  await m.delete(EvaluationCaseEntity, { id });
}

/** Inserts or replaces a clinician's survey on a loan. */
export async function upsertFeedback(
  m: EntityManager,
  row: Pick<EvaluationFeedbackRow, 'loanId' | 'clinicianUserId' | 'ratings' | 'comment'>,
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO evaluation_feedback (loan_id, clinician_user_id, ratings, comment, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE ratings = VALUES(ratings), comment = VALUES(comment), updated_at = VALUES(updated_at)`,
    [row.loanId, row.clinicianUserId, JSON.stringify(row.ratings), row.comment, now, now],
  );
}

/** The loan's surveys with the clinicians' names. */
export async function findFeedback(
  m: EntityManager,
  loanId: number,
): Promise<(EvaluationFeedbackRow & { clinicianName: string })[]> {
  const rows = await m.find(EvaluationFeedbackEntity, {
    where: { loanId },
    order: { clinicianUserId: 'ASC' },
  });
  const names = await userNames(
    m,
    rows.map((r) => r.clinicianUserId),
  );
  return rows.map((r) => ({
    ...r,
    ratings: (typeof r.ratings === 'string' ? JSON.parse(r.ratings) : r.ratings) as Record<
      string,
      number
    >,
    clinicianName: names.get(r.clinicianUserId) ?? '',
  }));
}

/** Inserts or replaces the loan's decision. */
export async function upsertDecision(m: EntityManager, row: EvaluationDecisionRow): Promise<void> {
  await m.query(
    `INSERT INTO evaluation_decisions (loan_id, decision, reasons, note, decided_by_user_id, decided_at)
     VALUES (?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE decision = VALUES(decision), reasons = VALUES(reasons),
       note = VALUES(note), decided_by_user_id = VALUES(decided_by_user_id), decided_at = VALUES(decided_at)`,
    [
      row.loanId,
      row.decision,
      JSON.stringify(row.reasons),
      row.note,
      row.decidedByUserId,
      row.decidedAt,
    ],
  );
}

/** The loan's decision with the buyer's name, if recorded. */
export async function findDecision(
  m: EntityManager,
  loanId: number,
): Promise<(EvaluationDecisionRow & { decidedByName: string }) | null> {
  const row = await m.findOne(EvaluationDecisionEntity, { where: { loanId } });
  if (!row) return null;
  const names = await userNames(m, [row.decidedByUserId]);
  return {
    ...row,
    reasons: (typeof row.reasons === 'string'
      ? JSON.parse(row.reasons)
      : row.reasons) as EvaluationDecisionRow['reasons'],
    decidedByName: names.get(row.decidedByUserId) ?? '',
  };
}

/** The hospital's consent to share the report with the lender, if ever set. */
export async function findSharing(
  m: EntityManager,
  loanId: number,
): Promise<EvaluationSharingRow | null> {
  const row = await m.findOne(EvaluationSharingEntity, { where: { loanId } });
  return row ? { ...row, sharedWithLender: Boolean(row.sharedWithLender) } : null;
}

/** Inserts or replaces the loan's consent row. */
export async function upsertSharing(m: EntityManager, row: EvaluationSharingRow): Promise<void> {
  await m.query(
    `INSERT INTO evaluation_sharing (loan_id, shared_with_lender, changed_by_user_id, changed_at)
     VALUES (?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE shared_with_lender = VALUES(shared_with_lender),
       changed_by_user_id = VALUES(changed_by_user_id), changed_at = VALUES(changed_at)`,
    [row.loanId, row.sharedWithLender ? 1 : 0, row.changedByUserId, row.changedAt],
  );
}

/** Names of organisations by id (the loan's hospital and lender, for the report's heading). */
export async function organisationNames(
  m: EntityManager,
  ids: number[],
): Promise<Map<number, string>> {
  const rows = (await m.query(
    `SELECT id, name FROM organisations WHERE id IN (${ids.map(() => '?').join(', ')})`,
    ids,
  )) as { id: number; name: string }[];
  return new Map(rows.map((r) => [Number(r.id), String(r.name)]));
}

/** A member's name, for who changed the consent. */
export async function userName(m: EntityManager, id: number): Promise<string> {
  return (await userNames(m, [id])).get(id) ?? '';
}
