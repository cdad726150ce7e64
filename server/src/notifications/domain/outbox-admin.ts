import type { DataSource } from 'typeorm';
import type { OutboxMessage, OutboxQuery } from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import type { AuthContext } from '../../identity';
import { AppError } from '../../errors';
import {
  findOutboxMessages,
  findOutboxRow,
  requeueParked,
  toOutboxMessage,
} from '../data-access/outbox-repository';
import { nudgeAfterCommit } from './outbox';

/** Outbox messages of one status for the platform admin (access is checked by the route). */
export function listOutbox(dataSource: DataSource, query: OutboxQuery): Promise<OutboxMessage[]> {
  return findOutboxMessages(dataSource.manager, query);
}

/**
 * Gives a parked message another round: pending, due now, attempts counted from zero, with an
 * audit event. Only parked messages: one that was sent would reach people a second time under
 * the same Message-ID, which many mail clients would silently drop anyway.
 */
export async function resendOutboxMessage(
  dataSource: DataSource,
  auth: AuthContext,
  id: number,
  ctx: { requestId: string | null },
  now: Date,
): Promise<OutboxMessage> {
  return dataSource.transaction(async (m) => {
    const row = await findOutboxRow(m, id, true);
    if (!row) throw AppError.notFound('outbox_message_not_found', 'There is no such message.');
    if (row.status !== 'parked') {
      throw AppError.conflict(
        'not_parked',
        `Only parked messages can be sent again; this one is ${row.status}.`,
      );
    }
    await requeueParked(m, id, now);
    await insertAuditEvent(m, {
      at: now,
      actorUserId: auth.user.id,
      organisationId: null,
      action: 'outbox.resent',
      subject: `outbox_message:${id}`,
      detail: { messageId: row.messageId, attempts: row.attempts, lastError: row.lastError },
      requestId: ctx.requestId,
    });
    nudgeAfterCommit(m);
    const after = await findOutboxRow(m, id);
    if (!after) throw new Error('outbox row vanished inside its own transaction');
    return toOutboxMessage(after);
  });
}
