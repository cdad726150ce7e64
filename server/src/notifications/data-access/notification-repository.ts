import type { EntityManager } from 'typeorm';
import type { Notification, Role } from '@evalon/contracts';
import { NotificationEntity, type NotificationRow } from './entities';

/** A notification to write for several people. */
export interface NewNotification {
  kind: string;
  title: string;
  body: string;
  link?: string | null;
  dedupeKey?: string | null;
}

/**
 * Inserts one notification per user in one statement. With a dedupe key, a user who already has
 * a notification with that key keeps it and gets no second one (unique (user_id, dedupe_key)).
 */
export async function insertNotifications(
  m: EntityManager,
  userIds: readonly number[],
  n: NewNotification,
  now: Date,
): Promise<void> {
  if (userIds.length === 0) return;
  await m
    .createQueryBuilder()
    .insert()
    .into(NotificationEntity)
    .values(
      userIds.map((userId) => ({
        userId,
        kind: n.kind,
        title: n.title,
        body: n.body,
        link: n.link ?? null,
        createdAt: now,
        readAt: null,
        dedupeKey: n.dedupeKey ?? null,
      })),
    )
    .orUpdate(['dedupe_key'], ['user_id', 'dedupe_key'])
    .execute();
}

function toNotification(row: NotificationRow): Notification {
  return {
    id: row.id,
    kind: row.kind,
    title: row.title,
    body: row.body,
    link: row.link,
    createdAt: row.createdAt.toISOString(),
    readAt: row.readAt ? row.readAt.toISOString() : null,
  };
}

/** A person's notifications, newest first, paged by id. */
export async function findNotifications(
  m: EntityManager,
  userId: number,
  filter: { unread?: boolean; limit: number; before?: number },
): Promise<Notification[]> {
  const qb = m
    .createQueryBuilder(NotificationEntity, 'n')
    .where('n.userId = :userId', { userId })
    .orderBy('n.id', 'DESC')
    .limit(filter.limit);
  if (filter.unread === true) qb.andWhere('n.readAt IS NULL');
  if (filter.unread === false) qb.andWhere('n.readAt IS NOT NULL');
  if (filter.before !== undefined) qb.andWhere('n.id < :before', { before: filter.before });
  return (await qb.getMany()).map(toNotification);
}

/** How many unread notifications a person has. */
export function countUnread(m: EntityManager, userId: number): Promise<number> {
  return m
    .createQueryBuilder(NotificationEntity, 'n')
    .where('n.userId = :userId AND n.readAt IS NULL', { userId })
    .getCount();
}

/** One notification of one person (null when it is someone else's or does not exist). */
export async function findOwnNotification(
  m: EntityManager,
  userId: number,
  id: number,
): Promise<Notification | null> {
  const row = await m.findOne(NotificationEntity, { where: { id, userId } });
  return row ? toNotification(row) : null;
}

/** Marks one of the person's notifications read (keeps the first read time); returns whether it is theirs. */
export async function markNotificationRead(
  m: EntityManager,
  userId: number,
  id: number,
  now: Date,
): Promise<boolean> {
  const result: { affectedRows?: number } = await m.query(
    'UPDATE notifications SET read_at = COALESCE(read_at, ?) WHERE id = ? AND user_id = ?',
    [now, id, userId],
  );
  // FOUND_ROWS semantics are not assumed: an already-read row may report 0 changed rows.
  if ((result.affectedRows ?? 0) > 0) return true;
  return (await m.count(NotificationEntity, { where: { id, userId } })) > 0;
}

/** Marks all the person's unread notifications read; returns how many changed. */
export async function markAllRead(m: EntityManager, userId: number, now: Date): Promise<number> {
  const result: { affectedRows?: number } = await m.query(
    'UPDATE notifications SET read_at = ? WHERE user_id = ? AND read_at IS NULL',
    [now, userId],
  );
  return result.affectedRows ?? 0;
}

/** A person who should hear about something, with what the e-mail templates need. */
export interface Recipient {
  userId: number;
  email: string;
  name: string;
  /** The person's own zone, or null when they have not chosen one. */
  timeZone: string | null;
  /** Roles (among those asked for) the person holds in the organisation. */
  roles: Role[];
}

/** Active people holding any of `roles` in the organisation, one entry per person, by id. */
export async function findRecipients(
  m: EntityManager,
  organisationId: number,
  roles: readonly Role[],
): Promise<Recipient[]> {
  if (roles.length === 0) return [];
  const rows: {
    userId: number;
    email: string;
    name: string;
    timeZone: string | null;
    role: Role;
  }[] = await m.query(
    `SELECT u.id AS userId, u.email AS email, u.name AS name, u.time_zone AS timeZone, ms.role AS role
         FROM memberships ms JOIN users u ON u.id = ms.user_id
        WHERE ms.organisation_id = ? AND ms.role IN (?) AND u.active = 1
        ORDER BY u.id, ms.role`,
    [organisationId, roles],
  );
  const byUser = new Map<number, Recipient>();
  for (const r of rows) {
    const userId = Number(r.userId);
    const found = byUser.get(userId);
    if (found) found.roles.push(r.role);
    else
      byUser.set(userId, {
        userId,
        email: r.email,
        name: r.name,
        timeZone: r.timeZone,
        roles: [r.role],
      });
  }
  return [...byUser.values()];
}

/** Whether the site belongs to the organisation. */
export async function siteBelongsTo(
  m: EntityManager,
  siteId: number,
  organisationId: number,
): Promise<boolean> {
  const rows: unknown[] = await m.query(
    'SELECT 1 FROM sites WHERE id = ? AND organisation_id = ?',
    [siteId, organisationId],
  );
  return rows.length > 0;
}
