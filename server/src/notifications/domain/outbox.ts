import { randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import {
  EventSubscriber,
  type EntityManager,
  type EntitySubscriberInterface,
  type QueryRunner,
  type TransactionCommitEvent,
  type TransactionRollbackEvent,
} from 'typeorm';
import { z } from 'zod';
import { OutboxMessageEntity, type StoredAttachment } from '../data-access/entities';

/** Header names a caller may set; the worker owns From, To, Cc, Subject, Message-ID and Date. */
const reservedHeaders = new Set(['from', 'to', 'cc', 'bcc', 'subject', 'message-id', 'date']);
const noLineBreaks = (v: string) => !/[\r\n]/.test(v);

const outboxEmail = z.object({
  to: z.union([z.email(), z.array(z.email()).min(1).max(50)]),
  cc: z.array(z.email()).max(50).optional(),
  // RFC 5322 §2.1.1: a line is at most 998 characters; a subject never spans our own lines.
  subject: z.string().min(1).max(998).refine(noLineBreaks, 'The subject has a line break.'),
  html: z.string(),
  text: z.string(),
  attachments: z
    .array(
      z.object({
        filename: z.string().min(1).max(255),
        contentType: z.string().min(1).max(255).refine(noLineBreaks),
        content: z.union([z.string(), z.instanceof(Buffer)]),
      }),
    )
    .max(10)
    .optional(),
  headers: z
    .record(
      z
        .string()
        .regex(/^[A-Za-z][A-Za-z0-9-]{0,75}$/, 'Not a header name.')
        .refine((h) => !reservedHeaders.has(h.toLowerCase()), 'This header is set by the worker.'),
      z.string().max(998).refine(noLineBreaks, 'A header value has a line break.'),
    )
    .optional(),
  dedupeKey: z.string().min(1).max(190).optional(),
  notBefore: z.date().optional(),
});

/** An e-mail to put into the outbox. */
export type OutboxEmail = z.input<typeof outboxEmail>;

// In-process wake-up: a worker in this process sleeps between polls and wakes when a
// transaction that enqueued has committed (other processes find the row by polling).
const signals = new EventEmitter();
signals.setMaxListeners(0);
const enqueuedFlag = 'evalonOutboxEnqueued';

/** Runs `listener` whenever this process has committed new outbox rows; returns the unsubscribe. */
export function onOutboxEnqueued(listener: () => void): () => void {
  signals.on('enqueued', listener);
  return () => signals.off('enqueued', listener);
}

/** Wakes the outbox workers of this process now (the rows are already committed). */
export function nudgeOutbox(): void {
  signals.emit('enqueued');
}

/**
 * Remembers that the transaction on `manager` wrote outbox rows, so the workers of this process
 * are woken once it commits; outside a transaction the row is committed already and they wake now.
 */
export function nudgeAfterCommit(manager: EntityManager): void {
  const runner: QueryRunner | undefined = manager.queryRunner;
  if (runner?.isTransactionActive) (runner.data as Record<string, unknown>)[enqueuedFlag] = true;
  else nudgeOutbox();
}

/**
 * Turns "this transaction enqueued" into a wake-up after COMMIT (never after ROLLBACK: those rows
 * do not exist). Registered on the data source.
 */
export class OutboxCommitSubscriber implements EntitySubscriberInterface {
  afterTransactionCommit(event: TransactionCommitEvent): void {
    const runner = event.queryRunner;
    // A savepoint release is a "commit" too; only the outermost COMMIT makes rows visible.
    if (runner.isTransactionActive) return;
    const data = runner.data as Record<string, unknown>;
    if (data[enqueuedFlag]) {
      delete data[enqueuedFlag];
      nudgeOutbox();
    }
  }

  afterTransactionRollback(event: TransactionRollbackEvent): void {
    if (!event.queryRunner.isTransactionActive) {
      delete (event.queryRunner.data as Record<string, unknown>)[enqueuedFlag];
    }
  }
}

// TypeORM only instantiates subscriber classes registered with its decorator; the project does
// not compile decorators, so the decorator function is applied by hand.
EventSubscriber()(OutboxCommitSubscriber);

/** Stored form of attachments: bytes as base64 so that binary files survive the JSON column. */
function storeAttachments(
  attachments: z.output<typeof outboxEmail>['attachments'],
): StoredAttachment[] | null {
  if (!attachments || attachments.length === 0) return null;
  return attachments.map((a) => ({
    filename: a.filename,
    contentType: a.contentType,
    contentBase64: (typeof a.content === 'string'
      ? Buffer.from(a.content, 'utf8')
      : a.content
    ).toString('base64'),
  }));
}

/**
 * Writes an e-mail into the outbox with the CALLER's entity manager, i.e. inside the caller's
 * transaction: it leaves only if that transaction commits, and a worker sends it afterwards.
 *
 * With a `dedupeKey` (e.g. `loan:42:confirmed:user:7`) the same business event enqueued twice
 * gives one message; the second call returns the first message's id.
 *
 * @param manager The transaction's entity manager (`dataSource.transaction(m => ...)`).
 * @param message The rendered e-mail.
 * @param now The caller's clock; the message is due from `notBefore` or now.
 * @returns The message id (UUID), which is also the e-mail's Message-ID local part.
 * @throws ZodError when the message is malformed (a programming error, not a user one).
 */
export async function enqueueEmail(
  manager: EntityManager,
  message: OutboxEmail,
  now: Date = new Date(),
): Promise<string> {
  const m = outboxEmail.parse(message);
  const messageId = randomUUID();
  const to = Array.isArray(m.to) ? m.to : [m.to];
  const values = {
    messageId,
    kind: 'email' as const,
    to,
    cc: m.cc && m.cc.length > 0 ? m.cc : null,
    subject: m.subject,
    html: m.html,
    text: m.text,
    attachments: storeAttachments(m.attachments),
    headers: m.headers && Object.keys(m.headers).length > 0 ? m.headers : null,
    status: 'pending' as const,
    attempts: 0,
    nextAttemptAt: m.notBefore ?? now,
    lastError: null,
    createdAt: now,
    sentAt: null,
    lockedBy: null,
    lockedUntil: null,
    dedupeKey: m.dedupeKey ?? null,
  };
  if (m.dedupeKey === undefined) {
    await manager.insert(OutboxMessageEntity, values);
    nudgeAfterCommit(manager);
    return messageId;
  }
  // The unique key decides: a concurrent transaction with the same key waits for ours, then
  // takes the no-op branch. `INSERT IGNORE` would also swallow unrelated errors, so not that.
  await manager
    .createQueryBuilder()
    .insert()
    .into(OutboxMessageEntity)
    .values(values)
    .orUpdate(['dedupe_key'], ['dedupe_key'])
    .execute();
  // A locking read sees the latest committed row: a plain read could use a snapshot taken
  // before the other transaction committed the row that won the unique key.
  const rows: { messageId: string }[] = await manager.query(
    'SELECT message_id AS messageId FROM outbox_messages WHERE dedupe_key = ? LOCK IN SHARE MODE',
    [m.dedupeKey],
  );
  const existing = rows[0]?.messageId;
  if (!existing) throw new Error(`outbox row with dedupe key ${m.dedupeKey} vanished`);
  if (existing === messageId) nudgeAfterCommit(manager);
  return existing;
}
