import type { EntityManager } from 'typeorm';
import type { CreditAgreement } from '@evalon/contracts';

interface AgreementSql {
  lender_id: number;
  hospital_id: number;
  hospital_name: string;
  active: number;
  approved_by: string | null;
  approved_at: Date | null;
  updated_at: Date;
}

function toAgreement(r: AgreementSql): CreditAgreement {
  return {
    lenderId: Number(r.lender_id),
    hospitalId: Number(r.hospital_id),
    hospitalName: r.hospital_name,
    active: Number(r.active) === 1,
    approvedBy: r.approved_by,
    approvedAt: r.approved_at ? new Date(r.approved_at).toISOString() : null,
    updatedAt: new Date(r.updated_at).toISOString(),
  };
}

const select = `SELECT ca.lender_id, ca.hospital_id, h.name AS hospital_name, ca.active,
         u.name AS approved_by, ca.approved_at, ca.updated_at
    FROM credit_agreements ca
    JOIN organisations h ON h.id = ca.hospital_id
    LEFT JOIN users u ON u.id = ca.approved_by_user_id`;

/** A lender's credit agreements, by hospital name. */
export async function findCreditAgreements(
  m: EntityManager,
  lenderId: number,
): Promise<CreditAgreement[]> {
  const rows: AgreementSql[] = await m.query(
    `${select} WHERE ca.lender_id = ? ORDER BY h.name, ca.hospital_id`,
    [lenderId],
  );
  return rows.map(toAgreement);
}

/** One agreement, or null. */
export async function findCreditAgreement(
  m: EntityManager,
  lenderId: number,
  hospitalId: number,
): Promise<CreditAgreement | null> {
  const rows: AgreementSql[] = await m.query(
    `${select} WHERE ca.lender_id = ? AND ca.hospital_id = ?`,
    [lenderId, hospitalId],
  );
  return rows[0] ? toAgreement(rows[0]) : null;
}

/**
 * Whether the hospital has an active agreement with the lender, read with a shared lock so that
 * a fleet manager switching it off waits for (or is waited on by) a confirmation relying on it.
 */
export async function findActiveCreditAgreement(
  m: EntityManager,
  lenderId: number,
  hospitalId: number,
): Promise<boolean> {
  const rows: unknown[] = await m.query(
    `SELECT id FROM credit_agreements WHERE lender_id = ? AND hospital_id = ? AND active = 1
      LOCK IN SHARE MODE`,
    [lenderId, hospitalId],
  );
  return rows.length > 0;
}

/**
 * Turns an agreement on or off (creating it on first use). Turning it on records who approved it
 * and when; turning it off keeps that record and notes who changed it.
 */
export async function upsertCreditAgreement(
  m: EntityManager,
  agreement: { lenderId: number; hospitalId: number; active: boolean; userId: number },
  now: Date,
): Promise<void> {
  await m.query(
    `INSERT INTO credit_agreements (lender_id, hospital_id, active, approved_by_user_id, approved_at,
        updated_by_user_id, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?)
     ON DUPLICATE KEY UPDATE
        approved_by_user_id = IF(VALUES(active) = 1 AND active = 0, VALUES(updated_by_user_id), approved_by_user_id),
        approved_at = IF(VALUES(active) = 1 AND active = 0, VALUES(updated_at), approved_at),
        active = VALUES(active),
        updated_by_user_id = VALUES(updated_by_user_id),
        updated_at = VALUES(updated_at)`,
    [
      agreement.lenderId,
      agreement.hospitalId,
      agreement.active ? 1 : 0,
      agreement.active ? agreement.userId : null,
      agreement.active ? now : null,
      agreement.userId,
      now,
      now,
    ],
  );
}
