import type { EntityManager } from 'typeorm';
import {
  memberStatusLabels,
  memberStatuses,
  roleLabels,
  roles,
  type Member,
  type MemberSortField,
  type MemberStatus,
  type Membership,
  type PageQuery,
  type Role,
  type SessionUser,
} from '@evalon/contracts';
import { likePattern } from '../../database/sql';
import { pageSql } from '../../database/paging';
import type { ManagingCandidate } from '../domain/policy';
import {
  MembershipEntity,
  UserEntity,
  UserTokenEntity,
  type MembershipRow,
  type TokenPurpose,
  type UserRow,
  type UserTokenRow,
} from './entities';

/** Plain copy of a user row (no TypeORM instance leaves this module). */
export type User = UserRow;

/** Finds a user by (already normalised) e-mail; `lock` takes a row lock for the transaction. */
export async function findUserByEmail(
  m: EntityManager,
  email: string,
  lock = false,
): Promise<User | null> {
  const qb = m.createQueryBuilder(UserEntity, 'u').where('u.email = :email', { email });
  if (lock) qb.setLock('pessimistic_write');
  return (await qb.getOne()) ?? null;
}

/** Finds a user by id; `lock` takes a row lock for the transaction. */
export async function findUserById(
  m: EntityManager,
  id: number,
  lock = false,
): Promise<User | null> {
  const qb = m.createQueryBuilder(UserEntity, 'u').where('u.id = :id', { id });
  if (lock) qb.setLock('pessimistic_write');
  return (await qb.getOne()) ?? null;
}

/** Finds a user by the Google `sub` linked to them. */
export async function findUserByGoogleSubject(
  m: EntityManager,
  subject: string,
): Promise<User | null> {
  return (await m.findOne(UserEntity, { where: { googleSubject: subject } })) ?? null;
}

/** Inserts a user and returns its id. */
export async function insertUser(
  m: EntityManager,
  user: Pick<User, 'email' | 'name' | 'passwordHash' | 'active' | 'timeZone'>,
  now: Date,
): Promise<number> {
  const result = await m.insert(UserEntity, {
    ...user,
    googleSubject: null,
    lastSignInAt: null,
    createdAt: now,
    updatedAt: now,
  });
  return Number(result.identifiers[0]?.id);
}

/** Updates some columns of a user (always bumps `updated_at`). */
export async function updateUser(
  m: EntityManager,
  id: number,
  changes: Partial<
    Pick<User, 'name' | 'passwordHash' | 'active' | 'timeZone' | 'googleSubject' | 'lastSignInAt'>
  >,
  now: Date,
): Promise<void> {
  await m.update(UserEntity, { id }, { ...changes, updatedAt: now });
}

interface SessionUserRow {
  id: number;
  email: string;
  name: string;
  timeZone: string | null;
  active: number | boolean;
  authVersion: number;
  organisationId: number | null;
  organisationName: string | null;
  organisationKind: Membership['organisationKind'] | null;
  role: Role | null;
}

/**
 * The person with memberships as the session sees them and the `auth_version` they were read
 * at, or null when no such user exists. One statement, so the version and the memberships come
 * from the same snapshot (a cache keyed by the version can never hold newer data under an
 * older number or the reverse).
 */
export async function loadSessionUser(
  m: EntityManager,
  userId: number,
): Promise<{ user: SessionUser; active: boolean; version: number } | null> {
  const rows: SessionUserRow[] = await m.query(
    `SELECT u.id, u.email, u.name, u.time_zone AS timeZone, u.active, u.auth_version AS authVersion,
            o.id AS organisationId, o.name AS organisationName, o.kind AS organisationKind,
            ms.role AS role
       FROM users u
       LEFT JOIN memberships ms ON ms.user_id = u.id
       LEFT JOIN organisations o ON o.id = ms.organisation_id
      WHERE u.id = ?
      ORDER BY o.name, ms.role`,
    [userId],
  );
  const first = rows[0];
  if (!first) return null;
  return {
    active: Boolean(Number(first.active)),
    version: Number(first.authVersion),
    user: {
      id: Number(first.id),
      email: first.email,
      name: first.name,
      timeZone: first.timeZone,
      memberships: rows
        .filter((r) => r.organisationId !== null && r.role !== null)
        .map((r) => ({
          organisationId: Number(r.organisationId),
          organisationName: r.organisationName ?? '',
          organisationKind: r.organisationKind as Membership['organisationKind'],
          role: r.role as Role,
        })),
    },
  };
}

/** The person's `auth_version` (see {@link loadSessionUser}), or null when no such user exists. */
export async function readAuthVersion(m: EntityManager, userId: number): Promise<number | null> {
  const rows: { v: number }[] = await m.query('SELECT auth_version AS v FROM users WHERE id = ?', [
    userId,
  ]);
  return rows[0] ? Number(rows[0].v) : null;
}

/** Inserts a membership and returns its id. */
export async function insertMembership(
  m: EntityManager,
  membership: Pick<MembershipRow, 'userId' | 'organisationId' | 'role'>,
  now: Date,
): Promise<number> {
  const result = await m.insert(MembershipEntity, { ...membership, createdAt: now });
  return Number(result.identifiers[0]?.id);
}

/** One membership of an organisation, or null. */
export async function findMembership(
  m: EntityManager,
  organisationId: number,
  membershipId: number,
): Promise<MembershipRow | null> {
  return (
    (await m.findOne(MembershipEntity, { where: { id: membershipId, organisationId } })) ?? null
  );
}

/** Whether the user already holds the role in the organisation. */
export async function hasMembership(
  m: EntityManager,
  userId: number,
  organisationId: number,
  role: Role,
): Promise<boolean> {
  return (await m.count(MembershipEntity, { where: { userId, organisationId, role } })) > 0;
}

/** Changes a membership's role. */
export async function updateMembershipRole(
  m: EntityManager,
  membershipId: number,
  role: Role,
): Promise<void> {
  await m.update(MembershipEntity, { id: membershipId }, { role });
}

/** Organisations the user belongs to (distinct ids). */
export async function organisationIdsOfUser(m: EntityManager, userId: number): Promise<number[]> {
  const rows: { organisationId: number }[] = await m.query(
    'SELECT DISTINCT organisation_id AS organisationId FROM memberships WHERE user_id = ?',
    [userId],
  );
  return rows.map((r) => Number(r.organisationId));
}

interface MemberQueryRow {
  membershipId: number;
  userId: number;
  email: string;
  name: string;
  role: Role;
  active: number;
  passwordHash: string | null;
  lastSignInAt: Date | null;
}

const memberSelect = `
  SELECT ms.id AS membershipId, u.id AS userId, u.email AS email, u.name AS name, ms.role AS role,
         u.active AS active, u.password_hash AS passwordHash, u.last_sign_in_at AS lastSignInAt
    FROM memberships ms JOIN users u ON u.id = ms.user_id`;

function toMember(r: MemberQueryRow): Member {
  return {
    membershipId: Number(r.membershipId),
    userId: Number(r.userId),
    email: r.email,
    name: r.name,
    role: r.role,
    active: Boolean(r.active),
    // Pending: invited but has neither set a password nor ever signed in (e.g. with Google).
    pending: r.passwordHash === null && r.lastSignInAt === null,
    lastSignInAt: r.lastSignInAt ? new Date(r.lastSignInAt).toISOString() : null,
  };
}

/** Member status in SQL, the same rule as {@link toMember}: deactivated wins over pending. */
const memberStatusSql = `CASE WHEN u.active = 0 THEN 'deactivated'
  WHEN u.password_hash IS NULL AND u.last_sign_in_at IS NULL THEN 'pending' ELSE 'active' END`;

/** SQL list of values sorted by their words, for `FIELD(...)`: the order people read. */
function byLabel<K extends string>(keys: readonly K[], labels: Record<K, string>): string {
  return [...keys]
    .sort((a, b) => labels[a].localeCompare(labels[b]))
    .map((k) => `'${k}'`)
    .join(', ');
}

/** SQL for each sortable column of the member list. */
const memberSortColumns: Record<MemberSortField, string> = {
  name: 'CONCAT(u.name, CHAR(0), u.email)',
  role: `FIELD(ms.role, ${byLabel(roles, roleLabels)})`,
  status: `FIELD(${memberStatusSql}, ${byLabel(memberStatuses, memberStatusLabels)})`,
  lastSignIn: 'u.last_sign_in_at',
};

/** WHERE clause of a member search: name or e-mail contains `q`, or a role's or status's words. */
function memberWhere(organisationId: number, q: string | undefined) {
  const where = ['ms.organisation_id = ?'];
  const params: unknown[] = [organisationId];
  if (q) {
    const words = q.toLocaleLowerCase();
    const parts = ['u.name LIKE ?', 'u.email LIKE ?'];
    params.push(likePattern(q), likePattern(q));
    const roleHits = roles.filter((r) => roleLabels[r].toLocaleLowerCase().includes(words));
    if (roleHits.length) {
      parts.push(`ms.role IN (${roleHits.map(() => '?').join(', ')})`);
      params.push(...roleHits);
    }
    const statusHits = memberStatuses.filter((st) =>
      memberStatusLabels[st].toLocaleLowerCase().includes(words),
    );
    if (statusHits.length) {
      parts.push(`${memberStatusSql} IN (${statusHits.map(() => '?').join(', ')})`);
      params.push(...statusHits);
    }
    where.push(`(${parts.join(' OR ')})`);
  }
  return { sql: `WHERE ${where.join(' AND ')}`, params };
}

/** Members of an organisation, by name. */
export async function listMembers(m: EntityManager, organisationId: number): Promise<Member[]> {
  const rows: MemberQueryRow[] = await m.query(
    `${memberSelect} WHERE ms.organisation_id = ? ORDER BY u.name, u.email, ms.role`,
    [organisationId],
  );
  return rows.map(toMember);
}

/** One page of an organisation's members matching `q`, in the order asked for. */
export async function findMemberPage(
  m: EntityManager,
  organisationId: number,
  query: PageQuery,
): Promise<Member[]> {
  const where = memberWhere(organisationId, query.q);
  const order = pageSql(query, memberSortColumns, 'ms.id');
  const rows: MemberQueryRow[] = await m.query(`${memberSelect} ${where.sql} ${order.sql}`, [
    ...where.params,
    ...order.params,
  ]);
  return rows.map(toMember);
}

/** How many of an organisation's members match `q`, per status. */
export async function countMembers(
  m: EntityManager,
  organisationId: number,
  q: string | undefined,
): Promise<Record<MemberStatus, number>> {
  const where = memberWhere(organisationId, q);
  const rows: { status: MemberStatus; count: string | number }[] = await m.query(
    `SELECT ${memberStatusSql} AS status, COUNT(*) AS count
       FROM memberships ms JOIN users u ON u.id = ms.user_id ${where.sql} GROUP BY status`,
    where.params,
  );
  const counts: Record<MemberStatus, number> = { active: 0, pending: 0, deactivated: 0 };
  for (const r of rows) counts[r.status] = Number(r.count);
  return counts;
}

/** One member by membership id, or null. */
export async function getMember(
  m: EntityManager,
  organisationId: number,
  membershipId: number,
): Promise<Member | null> {
  const rows: MemberQueryRow[] = await m.query(
    `${memberSelect} WHERE ms.organisation_id = ? AND ms.id = ?`,
    [organisationId, membershipId],
  );
  return rows[0] ? toMember(rows[0]) : null;
}

/** Memberships of an organisation with the holder's active flag, locked for the transaction. */
export async function lockManagingCandidates(
  m: EntityManager,
  organisationId: number,
): Promise<ManagingCandidate[]> {
  const rows: { membershipId: number; userId: number; role: Role; active: number }[] =
    await m.query(
      `SELECT ms.id AS membershipId, ms.user_id AS userId, ms.role AS role, u.active AS active
       FROM memberships ms JOIN users u ON u.id = ms.user_id
      WHERE ms.organisation_id = ?
      ORDER BY ms.id
      FOR UPDATE`,
      [organisationId],
    );
  return rows.map((r) => ({
    membershipId: Number(r.membershipId),
    userId: Number(r.userId),
    role: r.role,
    active: Boolean(r.active),
  }));
}

/** Stores a one-time token (its hash only). */
export async function insertToken(
  m: EntityManager,
  token: Pick<
    UserTokenRow,
    'userId' | 'purpose' | 'tokenHash' | 'organisationId' | 'createdByUserId' | 'expiresAt'
  >,
  now: Date,
): Promise<void> {
  await m.insert(UserTokenEntity, { ...token, usedAt: null, createdAt: now });
}

/** The token row with that hash and purpose, locked for the transaction. */
export async function lockTokenByHash(
  m: EntityManager,
  tokenHash: string,
  purpose: TokenPurpose,
): Promise<UserTokenRow | null> {
  return (
    (await m
      .createQueryBuilder(UserTokenEntity, 't')
      .where('t.tokenHash = :tokenHash AND t.purpose = :purpose', { tokenHash, purpose })
      .setLock('pessimistic_write')
      .getOne()) ?? null
  );
}

/** Marks every still-open token of the user for `purpose` as used (one link at a time). */
export async function useOpenTokens(
  m: EntityManager,
  userId: number,
  purpose: TokenPurpose,
  now: Date,
): Promise<void> {
  await m
    .createQueryBuilder()
    .update(UserTokenEntity)
    .set({ usedAt: now })
    .where('userId = :userId AND purpose = :purpose AND usedAt IS NULL', { userId, purpose })
    .execute();
}

/** Deletes the user's sessions (all, or all but `exceptSessionId`); returns how many. */
export async function deleteSessionsOfUser(
  m: EntityManager,
  userId: number,
  exceptSessionId?: string,
): Promise<number> {
  const result: { affectedRows?: number } = exceptSessionId
    ? await m.query('DELETE FROM sessions WHERE user_id = ? AND session_id <> ?', [
        userId,
        exceptSessionId,
      ])
    : await m.query('DELETE FROM sessions WHERE user_id = ?', [userId]);
  return result.affectedRows ?? 0;
}
