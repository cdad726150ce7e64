import type { DataSource, EntityManager } from 'typeorm';
import { NoticeJobEntity, type NoticeJobRow } from './entities';

/**
 * Adds a job with the CALLER's manager (inside the caller's transaction). The unique dedupe key
 * decides: the same event deferred twice (a replay) leaves the first job as it was.
 */
export async function insertNoticeJob(
  m: EntityManager,
  job: Pick<NoticeJobRow, 'kind' | 'payload' | 'dedupeKey'>,
  now: Date,
): Promise<void> {
  await m
    .createQueryBuilder()
    .insert()
    .into(NoticeJobEntity)
    .values({
      kind: job.kind,
      // A JSON column: TypeORM serialises the object; its deep-partial type does not model that.
      payload: job.payload as never,
      status: 'pending',
      attempts: 0,
      nextAttemptAt: now,
      lastError: null,
      createdAt: now,
      dedupeKey: job.dedupeKey,
    })
    .orUpdate(['dedupe_key'], ['dedupe_key'])
    .execute();
}

/**
 * The oldest due pending job, locked for this transaction; jobs another worker holds are
 * skipped (`SKIP LOCKED`, MariaDB 10.6+), so workers in several processes take different ones.
 */
export async function claimDueNoticeJob(m: EntityManager, now: Date): Promise<NoticeJobRow | null> {
  const rows: { id: number }[] = await m.query(
    `SELECT id FROM notice_jobs
      WHERE status = 'pending' AND next_attempt_at <= ?
      ORDER BY id LIMIT 1
      FOR UPDATE SKIP LOCKED`,
    [now],
  );
  if (rows.length === 0) return null;
  return m.findOne(NoticeJobEntity, { where: { id: Number(rows[0]!.id) } });
}

/** Removes a job that was rendered (its messages are in the same transaction). */
export async function deleteNoticeJob(m: EntityManager, id: number): Promise<void> {
  await m.query('DELETE FROM notice_jobs WHERE id = ?', [id]);
}

/** Records a failed rendering: pending again at `nextAttemptAt`, or parked for an admin. */
export async function markNoticeJobFailed(
  dataSource: DataSource,
  id: number,
  outcome: { park: boolean; nextAttemptAt: Date; error: string },
): Promise<void> {
  await dataSource.query(
    `UPDATE notice_jobs
        SET attempts = attempts + 1, status = ?, next_attempt_at = ?, last_error = ?
      WHERE id = ? AND status = 'pending'`,
    [outcome.park ? 'parked' : 'pending', outcome.nextAttemptAt, outcome.error.slice(0, 2000), id],
  );
}
