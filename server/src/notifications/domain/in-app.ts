import type { DataSource, EntityManager } from 'typeorm';
import type {
  Notification,
  NotificationList,
  NotificationsQuery,
  ReadAllResponse,
  Role,
} from '@evalon/contracts';
import { formatCalendarDate } from '@evalon/messages';
import { AppError } from '../../errors';
import {
  countUnread,
  findNotifications,
  findOwnNotification,
  findRecipients,
  insertNotifications,
  markAllRead,
  markNotificationRead,
  siteBelongsTo,
  type NewNotification,
  type Recipient,
} from '../data-access/notification-repository';

export type { NewNotification, Recipient };

/**
 * A site calendar day as the web app writes it ("Mon, Mar 15, 2027"), for notice texts: a notice
 * is stored once for everyone, so it uses the app's locale rather than each reader's.
 */
export function noticeDay(isoDate: string): string {
  try {
    return formatCalendarDate(isoDate, 'en-US', 'medium');
  } catch {
    return isoDate;
  }
}

/**
 * Writes an in-app notification for each user with the CALLER's entity manager, i.e. in the
 * same transaction as whatever caused it. With `dedupeKey`, each person gets it at most once
 * however often the cause is replayed.
 */
export async function notifyUsers(
  manager: EntityManager,
  userIds: readonly number[],
  notification: NewNotification,
  now: Date = new Date(),
): Promise<void> {
  const unique = [...new Set(userIds)].sort((a, b) => a - b);
  await insertNotifications(manager, unique, notification, now);
}

/** Who to look for with {@link recipientsFor}. */
export interface RecipientQuery {
  organisationId: number;
  roles: readonly Role[];
  /**
   * A site of that organisation the message is about (e.g. the campus of a loan). People are
   * not assigned to sites yet, so it only checks that the site is the organisation's (no one is
   * returned otherwise); everyone with the roles in the organisation is returned.
   */
  siteId?: number;
}

/** Active people of an organisation holding any of the roles, once each (for e-mails and notifications). */
export async function recipientsFor(
  manager: EntityManager,
  query: RecipientQuery,
): Promise<Recipient[]> {
  if (
    query.siteId !== undefined &&
    !(await siteBelongsTo(manager, query.siteId, query.organisationId))
  ) {
    return [];
  }
  return findRecipients(manager, query.organisationId, query.roles);
}

/** The signed-in person's notifications and their unread count. */
export async function listNotifications(
  dataSource: DataSource,
  userId: number,
  query: NotificationsQuery,
): Promise<NotificationList> {
  const m = dataSource.manager;
  const [items, unreadCount] = await Promise.all([
    findNotifications(m, userId, query),
    countUnread(m, userId),
  ]);
  return { items, unreadCount };
}

/** Marks one of the person's own notifications read; 404 for anyone else's (not 403: no hint it exists). */
export async function readNotification(
  dataSource: DataSource,
  userId: number,
  id: number,
  now: Date,
): Promise<{ notification: Notification; unreadCount: number }> {
  return dataSource.transaction(async (m) => {
    if (!(await markNotificationRead(m, userId, id, now))) {
      throw AppError.notFound('notification_not_found', 'There is no such notification.');
    }
    const notification = await findOwnNotification(m, userId, id);
    if (!notification) throw new Error('notification vanished inside its own transaction');
    return { notification, unreadCount: await countUnread(m, userId) };
  });
}

/** Marks all the person's notifications read. */
export async function readAllNotifications(
  dataSource: DataSource,
  userId: number,
  now: Date,
): Promise<ReadAllResponse> {
  return dataSource.transaction(async (m) => ({
    updated: await markAllRead(m, userId, now),
    unreadCount: await countUnread(m, userId),
  }));
}
