import { z } from 'zod';
import { outboxStatuses } from './values/notifications';
import { id, listOf } from './common';

export * from './values/notifications';

export const outboxStatus = z.enum(outboxStatuses).meta({ id: 'OutboxStatus' });

/** `GET /api/admin/outbox` query: one status (parked by default), newest first, paged by id. */
export const outboxQuery = z.object({
  status: outboxStatus.default('parked'),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  before: id.optional(),
});
export type OutboxQuery = z.infer<typeof outboxQuery>;

/**
 * One outbox e-mail as the admin sees it. Bodies are left out on purpose: invitation and reset
 * e-mails carry one-time links that nobody but the recipient should read.
 */
export const outboxMessage = z
  .object({
    id: z.number().int(),
    /** UUID; the e-mail's Message-ID is `<messageId@domain>` on every attempt. */
    messageId: z.string(),
    kind: z.literal('email'),
    to: z.array(z.string()),
    cc: z.array(z.string()),
    subject: z.string(),
    attachmentCount: z.number().int(),
    status: outboxStatus,
    attempts: z.number().int(),
    nextAttemptAt: z.string(),
    lastError: z.string().nullable(),
    createdAt: z.string(),
    sentAt: z.string().nullable(),
    dedupeKey: z.string().nullable(),
  })
  .meta({ id: 'OutboxMessage' });
export type OutboxMessage = z.infer<typeof outboxMessage>;

export const outboxList = listOf(outboxMessage).meta({ id: 'OutboxList' });
export type OutboxList = z.infer<typeof outboxList>;

/** Path of one outbox message. */
export const outboxMessageParams = z.object({ id });

/** Answer of `POST /api/admin/outbox/:id/resend`. */
export const outboxMessageResponse = z
  .object({ message: outboxMessage })
  .meta({ id: 'OutboxMessageResponse' });
export type OutboxMessageResponse = z.infer<typeof outboxMessageResponse>;

/** One in-app notification of the signed-in person. */
export const notification = z
  .object({
    id: z.number().int(),
    /** What it is about, dotted, e.g. `loan.confirmed`. */
    kind: z.string(),
    title: z.string(),
    body: z.string(),
    /** Path inside the web app, e.g. `/loans/42`. */
    link: z.string().nullable(),
    createdAt: z.string(),
    readAt: z.string().nullable(),
  })
  .meta({ id: 'Notification' });
export type Notification = z.infer<typeof notification>;

/** `GET /api/notifications` query: `unread=true` for unread only; newest first, paged by id. */
export const notificationsQuery = z.object({
  unread: z.stringbool().optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
  before: id.optional(),
});
export type NotificationsQuery = z.infer<typeof notificationsQuery>;

/** Answer of `GET /api/notifications`: the page asked for and how many are unread in all. */
export const notificationList = z
  .object({ items: z.array(notification), unreadCount: z.number().int() })
  .meta({ id: 'NotificationList' });
export type NotificationList = z.infer<typeof notificationList>;

/** Path of one notification. */
export const notificationParams = z.object({ id });

/** Answer of `POST /api/notifications/:id/read`. */
export const notificationResponse = z
  .object({ notification, unreadCount: z.number().int() })
  .meta({ id: 'NotificationResponse' });
export type NotificationResponse = z.infer<typeof notificationResponse>;

/** Answer of `POST /api/notifications/read-all`. */
export const readAllResponse = z
  .object({
    /** How many notifications this call marked as read. */
    updated: z.number().int(),
    unreadCount: z.number().int(),
  })
  .meta({ id: 'ReadAllResponse' });
export type ReadAllResponse = z.infer<typeof readAllResponse>;
