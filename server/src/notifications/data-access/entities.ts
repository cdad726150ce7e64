import { EntitySchema } from 'typeorm';
import type { OutboxStatus } from '@evalon/contracts';
import { idColumn, instantColumn, refColumn } from '../../database/columns';

/** An attachment as the outbox stores it: the bytes in base64, so binary files survive JSON. */
export interface StoredAttachment {
  filename: string;
  contentType: string;
  contentBase64: string;
}

/** A row of `outbox_messages`: one e-mail waiting for, or done with, delivery. */
export interface OutboxMessageRow {
  id: number;
  /** UUID v4; the e-mail's Message-ID is `<messageId@domain>` on every attempt. */
  messageId: string;
  kind: 'email';
  to: string[];
  cc: string[] | null;
  subject: string;
  html: string;
  text: string;
  attachments: StoredAttachment[] | null;
  headers: Record<string, string> | null;
  status: OutboxStatus;
  /** Send attempts started (counted when a worker claims the row). */
  attempts: number;
  /** Earliest instant a worker may claim the row while it is pending. */
  nextAttemptAt: Date;
  lastError: string | null;
  createdAt: Date;
  sentAt: Date | null;
  /** Worker holding the row while it is `sending`. */
  lockedBy: string | null;
  /** End of that worker's lease; after it, another worker may reclaim the row. */
  lockedUntil: Date | null;
  /** Business identity of the message (e.g. `loan:42:confirmed:user:7`); unique when set. */
  dedupeKey: string | null;
}

export const OutboxMessageEntity = new EntitySchema<OutboxMessageRow>({
  name: 'OutboxMessage',
  tableName: 'outbox_messages',
  columns: {
    id: idColumn,
    messageId: { type: 'char', length: 36, name: 'message_id' },
    kind: { type: 'varchar', length: 16, default: 'email' },
    to: { type: 'json', name: 'to_addresses' },
    cc: { type: 'json', name: 'cc_addresses', nullable: true },
    subject: { type: 'varchar', length: 998 },
    html: { type: 'mediumtext' },
    text: { type: 'mediumtext' },
    attachments: { type: 'json', nullable: true },
    headers: { type: 'json', nullable: true },
    status: { type: 'varchar', length: 16, default: 'pending' },
    attempts: { type: 'smallint', unsigned: true, default: 0 },
    nextAttemptAt: instantColumn('next_attempt_at'),
    lastError: { type: 'varchar', length: 2000, name: 'last_error', nullable: true },
    createdAt: instantColumn('created_at'),
    sentAt: instantColumn('sent_at', true),
    lockedBy: { type: 'varchar', length: 100, name: 'locked_by', nullable: true },
    lockedUntil: instantColumn('locked_until', true),
    dedupeKey: { type: 'varchar', length: 190, name: 'dedupe_key', nullable: true },
  },
  indices: [
    { name: 'ix_outbox_messages_due', columns: ['status', 'nextAttemptAt', 'id'] },
    { name: 'ix_outbox_messages_lease', columns: ['status', 'lockedUntil'] },
    { name: 'uq_outbox_messages_dedupe_key', columns: ['dedupeKey'], unique: true },
    { name: 'uq_outbox_messages_message_id', columns: ['messageId'], unique: true },
  ],
});

/** A row of `notifications`: one in-app message for one person. */
export interface NotificationRow {
  id: number;
  userId: number;
  /** What it is about, dotted (e.g. `loan.confirmed`). */
  kind: string;
  title: string;
  body: string;
  /** Path inside the web app (e.g. `/loans/42`), or null. */
  link: string | null;
  createdAt: Date;
  readAt: Date | null;
  /** Business identity, unique per person when set. */
  dedupeKey: string | null;
}

export const NotificationEntity = new EntitySchema<NotificationRow>({
  name: 'Notification',
  tableName: 'notifications',
  columns: {
    id: idColumn,
    userId: refColumn('user_id'),
    kind: { type: 'varchar', length: 64 },
    title: { type: 'varchar', length: 200 },
    body: { type: 'varchar', length: 2000 },
    link: { type: 'varchar', length: 500, nullable: true },
    createdAt: instantColumn('created_at'),
    readAt: instantColumn('read_at', true),
    dedupeKey: { type: 'varchar', length: 190, name: 'dedupe_key', nullable: true },
  },
  indices: [
    { name: 'ix_notifications_user_unread', columns: ['userId', 'readAt', 'id'] },
    { name: 'uq_notifications_user_dedupe', columns: ['userId', 'dedupeKey'], unique: true },
  ],
  foreignKeys: [
    {
      name: 'fk_notifications_user',
      target: 'User',
      columnNames: ['userId'],
      referencedColumnNames: ['id'],
      onDelete: 'RESTRICT',
      onUpdate: 'RESTRICT',
    },
  ],
});

/** A row of `notice_jobs`: a business event whose messages the outbox worker renders later. */
export interface NoticeJobRow {
  id: number;
  kind: 'loan';
  /** What the renderer needs (for `loan`: the loans component's notice). */
  payload: Record<string, unknown>;
  /** `parked` after the renderer failed `maxAttempts` times; an admin looks at it. */
  status: 'pending' | 'parked';
  attempts: number;
  nextAttemptAt: Date;
  lastError: string | null;
  createdAt: Date;
  /** e.g. `loan:42:confirmed`: the same event deferred twice is one job. */
  dedupeKey: string;
}

export const NoticeJobEntity = new EntitySchema<NoticeJobRow>({
  name: 'NoticeJob',
  tableName: 'notice_jobs',
  columns: {
    id: idColumn,
    kind: { type: 'varchar', length: 16 },
    payload: { type: 'json' },
    status: { type: 'varchar', length: 16, default: 'pending' },
    attempts: { type: 'smallint', unsigned: true, default: 0 },
    nextAttemptAt: instantColumn('next_attempt_at'),
    lastError: { type: 'varchar', length: 2000, name: 'last_error', nullable: true },
    createdAt: instantColumn('created_at'),
    dedupeKey: { type: 'varchar', length: 190, name: 'dedupe_key' },
  },
  indices: [
    { name: 'ix_notice_jobs_due', columns: ['status', 'nextAttemptAt', 'id'] },
    { name: 'uq_notice_jobs_dedupe_key', columns: ['dedupeKey'], unique: true },
  ],
});
