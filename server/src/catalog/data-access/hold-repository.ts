import type { EntityManager } from 'typeorm';
import type { LoanState } from '@evalon/contracts';

/** A hold as the scheduling computations need it: a closed interval of depot dates. */
export interface HoldInterval {
  id: number;
  unitId: number;
  kind: 'loan' | 'maintenance';
  /** First blocked day `YYYY-MM-DD` (depot calendar). */
  start: string;
  /** Last blocked day, included. */
  end: string;
  loanId: number | null;
  /** Hospital of the loan (null for maintenance). */
  hospitalId: number | null;
}

/** mysql2 returns DATE as a Date at UTC midnight (connection zone `Z`) unless cast to text. */
export function isoDateOf(value: Date | string): string {
  return typeof value === 'string' ? value.slice(0, 10) : value.toISOString().slice(0, 10);
}

interface HoldSqlRow {
  id: number;
  unit_id: number;
  kind: 'loan' | 'maintenance';
  start_date: string;
  end_date: string;
  loan_id: number | null;
  hospital_id: number | null;
}

/**
 * Holds of some units that touch `[from, to]`, by unit then end. One query whatever the number
 * of units: the availability search reads every candidate's holds at once.
 */
export async function findHoldsForUnits(
  m: EntityManager,
  unitIds: readonly number[],
  from: string,
  to: string,
): Promise<HoldInterval[]> {
  if (unitIds.length === 0) return [];
  // Ordered as the (unit_id, end_date, ...) index reads, so the database sorts nothing.
  const rows: HoldSqlRow[] = await m.query(
    `SELECT h.id, h.unit_id, h.kind, CAST(h.start_date AS CHAR) AS start_date,
            CAST(h.end_date AS CHAR) AS end_date, h.loan_id, h.hospital_id
       FROM holds h
      WHERE h.unit_id IN (${unitIds.map(() => '?').join(', ')})
        AND h.end_date >= ? AND h.start_date <= ?
      ORDER BY h.unit_id, h.end_date`,
    [...unitIds, from, to],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    unitId: Number(r.unit_id),
    kind: r.kind,
    start: r.start_date,
    end: r.end_date,
    loanId: r.loan_id === null ? null : Number(r.loan_id),
    hospitalId: r.hospital_id === null ? null : Number(r.hospital_id),
  }));
}

/** A hold with what the calendar of a unit shows about its loan. */
export interface HoldWithLoan extends HoldInterval {
  reason: string | null;
  loanReference: string | null;
  loanState: LoanState | null;
  hospitalName: string | null;
}

/** One unit's holds overlapping `[from, to]` (either end open), by start. */
export async function listUnitHolds(
  m: EntityManager,
  unitId: number,
  from: string | undefined,
  to: string | undefined,
): Promise<HoldWithLoan[]> {
  const rows: (HoldSqlRow & {
    reason: string | null;
    reference: string | null;
    state: LoanState | null;
    hospital_name: string | null;
  })[] = await m.query(
    `SELECT h.id, h.unit_id, h.kind, CAST(h.start_date AS CHAR) AS start_date,
            CAST(h.end_date AS CHAR) AS end_date, h.loan_id, h.reason, l.hospital_id,
            l.reference, l.state, o.name AS hospital_name
       FROM holds h
       LEFT JOIN loans l ON l.id = h.loan_id
       LEFT JOIN organisations o ON o.id = l.hospital_id
      WHERE h.unit_id = ? AND h.end_date >= ? AND h.start_date <= ?
      ORDER BY h.start_date, h.id
      LIMIT 1000`,
    [unitId, from ?? '1000-01-01', to ?? '9999-12-31'],
  );
  return rows.map((r) => ({
    id: Number(r.id),
    unitId: Number(r.unit_id),
    kind: r.kind,
    start: r.start_date,
    end: r.end_date,
    loanId: r.loan_id === null ? null : Number(r.loan_id),
    hospitalId: r.hospital_id === null ? null : Number(r.hospital_id),
    reason: r.reason,
    loanReference: r.reference,
    loanState: r.state,
    hospitalName: r.hospital_name,
  }));
}

/** A hold to write. */
export interface NewHold {
  unitId: number;
  kind: 'loan' | 'maintenance';
  start: string;
  end: string;
  loanId: number | null;
  /** The loan's hospital (null for maintenance). */
  hospitalId: number | null;
  reason: string | null;
  /** The unit's booking version after this write (unique per unit). */
  sequence: number;
  createdByUserId: number | null;
}

/** Writes holds in one statement; returns the first new id (ids are consecutive). */
export async function insertHolds(
  m: EntityManager,
  holds: readonly NewHold[],
  now: Date,
): Promise<number> {
  if (holds.length === 0) return 0;
  const result: { insertId?: number } = await m.query(
    `INSERT INTO holds (unit_id, kind, start_date, end_date, loan_id, hospital_id, reason, sequence,
        created_at, created_by_user_id)
     VALUES ${holds.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').join(', ')}`,
    holds.flatMap((h) => [
      h.unitId,
      h.kind,
      h.start,
      h.end,
      h.loanId,
      h.hospitalId,
      h.reason,
      h.sequence,
      now,
      h.createdByUserId,
    ]),
  );
  return Number(result.insertId ?? 0);
}

/** One hold of a unit, or null. */
export async function findUnitHold(
  m: EntityManager,
  unitId: number,
  holdId: number,
): Promise<HoldWithLoan | null> {
  const all = await m.query(
    `SELECT h.id, h.unit_id, h.kind, CAST(h.start_date AS CHAR) AS start_date,
            CAST(h.end_date AS CHAR) AS end_date, h.loan_id, h.reason, l.hospital_id, l.reference,
            l.state, NULL AS hospital_name
       FROM holds h LEFT JOIN loans l ON l.id = h.loan_id
      WHERE h.id = ? AND h.unit_id = ?`,
    [holdId, unitId],
  );
  const r = all[0] as
    | (HoldSqlRow & { reason: string | null; reference: string | null; state: LoanState | null })
    | undefined;
  if (!r) return null;
  return {
    id: Number(r.id),
    unitId: Number(r.unit_id),
    kind: r.kind,
    start: r.start_date,
    end: r.end_date,
    loanId: r.loan_id === null ? null : Number(r.loan_id),
    hospitalId: r.hospital_id === null ? null : Number(r.hospital_id),
    reason: r.reason,
    loanReference: r.reference,
    loanState: r.state,
    hospitalName: null,
  };
}

/** Deletes one hold. */
export async function deleteHold(m: EntityManager, holdId: number): Promise<void> {
  await m.query('DELETE FROM holds WHERE id = ?', [holdId]);
}

/** Deletes a loan's holds (the loan was declined or cancelled). */
export async function deleteLoanHolds(m: EntityManager, loanId: number): Promise<number> {
  const result: { affectedRows?: number } = await m.query('DELETE FROM holds WHERE loan_id = ?', [
    loanId,
  ]);
  return result.affectedRows ?? 0;
}
