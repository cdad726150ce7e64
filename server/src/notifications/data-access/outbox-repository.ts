import { In, type DataSource, type EntityManager } from 'typeorm';
import type { OutboxMessage, OutboxStatus } from '@evalon/contracts';
import { OutboxMessageEntity, type OutboxMessageRow } from './entities';

/** What one claim did. */
export interface ClaimResult {
  /** Rows now `sending` under this worker's lease, oldest first (bodies included). */
  claimed: OutboxMessageRow[];
  /** Rows reclaimed from a dead worker with no attempts left, parked instead of sent. */
  parkedIds: number[];
}

/** Parameters of {@link claimDue}. */
export interface ClaimOptions {
  workerId: string;
  now: Date;
  leaseMs: number;
  batchSize: number;
  maxAttempts: number;
}

/**
 * Claims up to `batchSize` due rows for one worker in one short transaction: pending rows whose
 * `next_attempt_at` has come, and `sending` rows whose lease ran out (their worker died).
 * `FOR UPDATE SKIP LOCKED` (MariaDB 10.6+) lets concurrent workers take disjoint rows instead of
 * waiting for each other; the status flip to `sending` with a lease, in the same transaction,
 * keeps the rows theirs after COMMIT releases the row locks.
 *
 * READ COMMITTED: no gap locks, so business transactions inserting new outbox rows never wait
 * for a claim, and rows that were read but did not match are not left locked.
 */
export function claimDue(dataSource: DataSource, o: ClaimOptions): Promise<ClaimResult> {
  return dataSource.transaction('READ COMMITTED', async (m) => {
    const due: { id: number; status: OutboxStatus; attempts: number; lockedBy: string | null }[] =
      await m.query(
        `SELECT id, status, attempts, locked_by AS lockedBy
           FROM outbox_messages
          WHERE (status = 'pending' AND next_attempt_at <= ?)
             OR (status = 'sending' AND locked_until <= ?)
          ORDER BY id
          LIMIT ?
          FOR UPDATE SKIP LOCKED`,
        [o.now, o.now, o.batchSize],
      );
    if (due.length === 0) return { claimed: [], parkedIds: [] };

    // A row whose worker died while it held the last allowed attempt is parked, so a message
    // that kills its worker cannot take the fleet down in a loop.
    const exhausted = due.filter((r) => r.status === 'sending' && r.attempts >= o.maxAttempts);
    for (const r of exhausted) {
      await m.query(
        `UPDATE outbox_messages
            SET status = 'parked', locked_by = NULL, locked_until = NULL, last_error = ?
          WHERE id = ?`,
        [
          `Worker ${r.lockedBy ?? '?'} stopped while sending attempt ${r.attempts}; no attempts left.`,
          r.id,
        ],
      );
    }
    const ids = due.filter((r) => !exhausted.includes(r)).map((r) => Number(r.id));
    if (ids.length > 0) {
      await m.query(
        `UPDATE outbox_messages
            SET status = 'sending', locked_by = ?, locked_until = ?, attempts = attempts + 1
          WHERE id IN (?)`,
        [o.workerId, new Date(o.now.getTime() + o.leaseMs), ids],
      );
    }
    const claimed =
      ids.length > 0
        ? await m.find(OutboxMessageEntity, { where: { id: In(ids) }, order: { id: 'ASC' } })
        : [];
    return { claimed, parkedIds: exhausted.map((r) => Number(r.id)) };
  });
}

/**
 * Marks a row sent. Whoever got the mail server's acceptance records it, even if its lease ran
 * out meanwhile (the row is sent, whatever else happens); a row already sent stays as it was.
 * Returns whether this call changed it.
 */
export async function markSent(dataSource: DataSource, id: number, now: Date): Promise<boolean> {
  const result: { affectedRows?: number } = await dataSource.query(
    `UPDATE outbox_messages
        SET status = 'sent', sent_at = ?, locked_by = NULL, locked_until = NULL
      WHERE id = ? AND status <> 'sent'`,
    [now, id],
  );
  return (result.affectedRows ?? 0) > 0;
}

/**
 * Records a failed attempt of a row this worker holds: back to `pending` at `nextAttemptAt`,
 * or `parked` for an admin. Does nothing when the row is no longer this worker's.
 */
export async function markFailed(
  dataSource: DataSource,
  row: Pick<OutboxMessageRow, 'id'>,
  workerId: string,
  outcome: { park: boolean; nextAttemptAt: Date; error: string },
): Promise<boolean> {
  const result: { affectedRows?: number } = await dataSource.query(
    `UPDATE outbox_messages
        SET status = ?, next_attempt_at = ?, last_error = ?, locked_by = NULL, locked_until = NULL
      WHERE id = ? AND status = 'sending' AND locked_by = ?`,
    [
      outcome.park ? 'parked' : 'pending',
      outcome.nextAttemptAt,
      outcome.error.slice(0, 2000),
      row.id,
      workerId,
    ],
  );
  return (result.affectedRows ?? 0) > 0;
}

/**
 * Gives claimed rows back without having tried them (shutdown, or a lease too short for what is
 * left of a batch): pending again, due now, the attempt counted at the claim taken back.
 */
export async function releaseClaimed(
  dataSource: DataSource,
  ids: number[],
  workerId: string,
): Promise<void> {
  if (ids.length === 0) return;
  await dataSource.query(
    `UPDATE outbox_messages
        SET status = 'pending', locked_by = NULL, locked_until = NULL,
            attempts = IF(attempts > 0, attempts - 1, 0)
      WHERE id IN (?) AND status = 'sending' AND locked_by = ?`,
    [ids, workerId],
  );
}

/** The admin's view of a row (no bodies: they may hold one-time links). */
export function toOutboxMessage(row: OutboxMessageRow): OutboxMessage {
  return {
    id: row.id,
    messageId: row.messageId,
    kind: row.kind,
    to: row.to,
    cc: row.cc ?? [],
    subject: row.subject,
    attachmentCount: row.attachments?.length ?? 0,
    status: row.status,
    attempts: row.attempts,
    nextAttemptAt: row.nextAttemptAt.toISOString(),
    lastError: row.lastError,
    createdAt: row.createdAt.toISOString(),
    sentAt: row.sentAt ? row.sentAt.toISOString() : null,
    dedupeKey: row.dedupeKey,
  };
}

/** Outbox rows of one status, newest first, paged by id. */
export async function findOutboxMessages(
  m: EntityManager,
  filter: { status: OutboxStatus; limit: number; before?: number },
): Promise<OutboxMessage[]> {
  const qb = m
    .createQueryBuilder(OutboxMessageEntity, 'o')
    .where('o.status = :status', { status: filter.status })
    .orderBy('o.id', 'DESC')
    .limit(filter.limit);
  if (filter.before !== undefined) qb.andWhere('o.id < :before', { before: filter.before });
  return (await qb.getMany()).map(toOutboxMessage);
}

/** One outbox row by id; `lock` takes a row lock for the transaction. */
export async function findOutboxRow(
  m: EntityManager,
  id: number,
  lock = false,
): Promise<OutboxMessageRow | null> {
  const qb = m.createQueryBuilder(OutboxMessageEntity, 'o').where('o.id = :id', { id });
  if (lock) qb.setLock('pessimistic_write');
  return (await qb.getOne()) ?? null;
}

/** Makes a parked row pending again, due now, with a fresh count of attempts. */
export async function requeueParked(m: EntityManager, id: number, now: Date): Promise<void> {
  await m.update(
    OutboxMessageEntity,
    { id, status: 'parked' },
    { status: 'pending', attempts: 0, nextAttemptAt: now, lockedBy: null, lockedUntil: null },
  );
}
