import type { EntityManager } from 'typeorm';
import type {
  InviteRequest,
  Member,
  MemberPage,
  MemberQuery,
  Organisation,
  Role,
  SetPasswordRequest,
} from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { addedToOrganisationEmail, invitationEmail } from '@evalon/messages';
import { enqueueEmail } from '../../notifications';
import { findOrganisation } from '../../organisations';
import { AppError } from '../../errors';
import {
  deleteSessionsOfUser,
  findMembership,
  findUserByEmail,
  findUserById,
  getMember,
  hasMembership,
  insertMembership,
  insertToken,
  insertUser,
  countMembers,
  findMemberPage,
  lockManagingCandidates,
  lockTokenByHash,
  organisationIdsOfUser,
  updateMembershipRole,
  updateUser,
  useOpenTokens,
} from '../data-access/identity-repository';
import type { AuthContext } from './auth-context';
import type { IdentityDeps, RequestContext } from './deps';
import { hashPassword } from './passwords';
import { assignableRoles, keepsAManager, roleFitsKind } from './policy';
import { hashToken, invitationLifetimeMs, newOneTimeToken, tokenProblem } from './tokens';

const roleNotAllowed = (role: Role) =>
  AppError.forbidden(
    'role_not_allowed',
    `You cannot give people the ${role.replace('_', ' ')} role here.`,
  );

async function lockOrganisation(m: EntityManager, organisationId: number): Promise<Organisation> {
  // Locking the organisation row first serialises all member changes of one organisation.
  const organisation = await findOrganisation(m, organisationId, true);
  if (!organisation)
    throw AppError.notFound('organisation_not_found', 'There is no such organisation.');
  return organisation;
}

/** One page of an organisation's members (access is checked by the route). */
export async function listOrganisationMembers(
  deps: IdentityDeps,
  organisationId: number,
  query: MemberQuery,
): Promise<MemberPage> {
  const m = deps.dataSource.manager;
  const [items, counts] = await Promise.all([
    findMemberPage(m, organisationId, query),
    countMembers(m, organisationId, query.q),
  ]);
  return {
    items,
    total: counts.active + counts.pending + counts.deactivated,
    page: query.page,
    size: query.size,
    pending: counts.pending,
    deactivated: counts.deactivated,
  };
}

/**
 * Invites someone by e-mail. A new person gets an account without a password and a one-time
 * link (7 days) to choose one; someone who already has an account is added and told by e-mail.
 */
export async function inviteMember(
  deps: IdentityDeps,
  auth: AuthContext,
  organisationId: number,
  request: InviteRequest,
  ctx: RequestContext,
): Promise<Member> {
  const now = deps.now();
  const { token, tokenHash } = newOneTimeToken();
  const expiresAt = new Date(now.getTime() + invitationLifetimeMs);
  return deps.dataSource.transaction(async (m) => {
    const organisation = await lockOrganisation(m, organisationId);
    if (!roleFitsKind(request.role, organisation.kind)) {
      throw AppError.field(
        'role_not_for_organisation',
        'role',
        'That role does not exist in this kind of organisation.',
      );
    }
    if (!assignableRoles(auth, organisationId, organisation.kind).includes(request.role)) {
      throw roleNotAllowed(request.role);
    }
    let user = await findUserByEmail(m, request.email, true);
    if (user && !user.active) {
      throw AppError.conflict(
        'account_deactivated',
        'This person’s account is deactivated. Reactivate them instead of inviting them again.',
      );
    }
    if (user && (await hasMembership(m, user.id, organisationId, request.role))) {
      throw AppError.conflict('already_member', 'This person already has that role here.');
    }
    if (!user) {
      const id = await insertUser(
        m,
        {
          email: request.email,
          name: request.name,
          passwordHash: null,
          active: true,
          timeZone: null,
        },
        now,
      );
      user = await findUserById(m, id);
    }
    if (!user) throw new Error('user vanished inside its own transaction');
    const membershipId = await insertMembership(
      m,
      { userId: user.id, organisationId, role: request.role },
      now,
    );
    const needsPassword = user.passwordHash === null && user.lastSignInAt === null;
    if (needsPassword) {
      await insertToken(
        m,
        {
          userId: user.id,
          purpose: 'invitation',
          tokenHash,
          organisationId,
          createdByUserId: auth.user.id,
          expiresAt,
        },
        now,
      );
    }
    await insertAuditEvent(m, {
      at: now,
      actorUserId: auth.user.id,
      organisationId,
      action: 'member.invited',
      subject: `membership:${membershipId}`,
      detail: {
        email: request.email,
        role: request.role,
        userId: user.id,
        newAccount: needsPassword,
      },
      requestId: ctx.requestId,
    });
    // The e-mail is written in this transaction: no membership without its e-mail, and no
    // e-mail about a membership that was rolled back. The outbox worker sends it after COMMIT.
    const message = needsPassword
      ? invitationEmail({
          to: user.email,
          inviteeName: user.name,
          inviterName: auth.user.name,
          organisationName: organisation.name,
          role: request.role,
          link: `${deps.publicUrl}/accept-invitation?token=${encodeURIComponent(token)}`,
          expiresAt,
        })
      : addedToOrganisationEmail({
          to: user.email,
          name: user.name,
          inviterName: auth.user.name,
          organisationName: organisation.name,
          role: request.role,
          link: `${deps.publicUrl}/sign-in`,
        });
    await enqueueEmail(m, message, now);
    const member = await getMember(m, organisationId, membershipId);
    if (!member) throw new Error('membership vanished inside its own transaction');
    return member;
  });
}

/** Sends a fresh invitation link to a member who has not accepted yet (older links stop working). */
export async function resendInvitation(
  deps: IdentityDeps,
  auth: AuthContext,
  organisationId: number,
  membershipId: number,
  ctx: RequestContext,
): Promise<Member> {
  const now = deps.now();
  const { token, tokenHash } = newOneTimeToken();
  const expiresAt = new Date(now.getTime() + invitationLifetimeMs);
  return deps.dataSource.transaction(async (m) => {
    const organisation = await lockOrganisation(m, organisationId);
    const membership = await findMembership(m, organisationId, membershipId);
    if (!membership) throw AppError.notFound('member_not_found', 'There is no such member here.');
    if (!assignableRoles(auth, organisationId, organisation.kind).includes(membership.role)) {
      throw roleNotAllowed(membership.role);
    }
    const user = await findUserById(m, membership.userId, true);
    if (!user || user.passwordHash !== null || user.lastSignInAt !== null) {
      throw AppError.conflict('not_pending', 'This person has already accepted the invitation.');
    }
    if (!user.active) {
      throw AppError.conflict(
        'account_deactivated',
        'Reactivate this person before inviting them again.',
      );
    }
    await useOpenTokens(m, user.id, 'invitation', now);
    await insertToken(
      m,
      {
        userId: user.id,
        purpose: 'invitation',
        tokenHash,
        organisationId,
        createdByUserId: auth.user.id,
        expiresAt,
      },
      now,
    );
    await insertAuditEvent(m, {
      at: now,
      actorUserId: auth.user.id,
      organisationId,
      action: 'member.invitation_resent',
      subject: `membership:${membershipId}`,
      detail: { userId: user.id },
      requestId: ctx.requestId,
    });
    await enqueueEmail(
      m,
      invitationEmail({
        to: user.email,
        inviteeName: user.name,
        inviterName: auth.user.name,
        organisationName: organisation.name,
        role: membership.role,
        link: `${deps.publicUrl}/accept-invitation?token=${encodeURIComponent(token)}`,
        expiresAt,
      }),
      now,
    );
    const member = await getMember(m, organisationId, membershipId);
    if (!member) throw new Error('membership vanished inside its own transaction');
    return member;
  });
}

/** Throws the readable error for a token that cannot be used. */
export function assertTokenUsable(
  row: { usedAt: Date | null; expiresAt: Date } | null,
  now: Date,
  kind: 'invitation' | 'reset',
): void {
  const problem = tokenProblem(row, now);
  const what = kind === 'invitation' ? 'invitation link' : 'password reset link';
  const askFor =
    kind === 'invitation'
      ? 'Ask your organisation’s administrator to send a new one.'
      : 'Ask for a new one.';
  if (problem === 'unknown')
    throw AppError.badRequest('token_invalid', `This ${what} is not valid. ${askFor}`);
  if (problem === 'used')
    throw AppError.gone('token_used', `This ${what} has already been used. ${askFor}`);
  if (problem === 'expired')
    throw AppError.gone('token_expired', `This ${what} has expired. ${askFor}`);
}

/**
 * Accepts an invitation: checks the one-time token, sets the password (and name if given),
 * uses up the token. Returns the user id so the caller can start the session.
 */
export async function acceptInvitation(
  deps: IdentityDeps,
  request: SetPasswordRequest,
  ctx: RequestContext,
): Promise<number> {
  // Hash outside the transaction: it takes tens of milliseconds and needs no locks.
  const passwordHash = await hashPassword(request.password);
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const row = await lockTokenByHash(m, hashToken(request.token), 'invitation');
    assertTokenUsable(row, now, 'invitation');
    const user = row ? await findUserById(m, row.userId, true) : null;
    if (!row || !user)
      throw AppError.badRequest('token_invalid', 'This invitation link is not valid.');
    if (!user.active) {
      throw AppError.forbidden(
        'account_deactivated',
        'This account has been deactivated. Ask your organisation’s administrator.',
      );
    }
    await updateUser(
      m,
      user.id,
      { passwordHash, ...(request.name ? { name: request.name } : {}) },
      now,
    );
    await useOpenTokens(m, user.id, 'invitation', now);
    await insertAuditEvent(m, {
      at: now,
      actorUserId: user.id,
      organisationId: row.organisationId,
      action: 'invitation.accepted',
      subject: `user:${user.id}`,
      detail: row.createdByUserId ? { invitedBy: row.createdByUserId } : null,
      requestId: ctx.requestId,
    });
    return user.id;
  });
}

/** Changes a member's role, keeping at least one person who can manage the organisation. */
export async function changeMemberRole(
  deps: IdentityDeps,
  auth: AuthContext,
  organisationId: number,
  membershipId: number,
  role: Role,
  ctx: RequestContext,
): Promise<Member> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const organisation = await lockOrganisation(m, organisationId);
    const candidates = await lockManagingCandidates(m, organisationId);
    const current = candidates.find((c) => c.membershipId === membershipId);
    if (!current) throw AppError.notFound('member_not_found', 'There is no such member here.');
    if (!roleFitsKind(role, organisation.kind)) {
      throw AppError.field(
        'role_not_for_organisation',
        'role',
        'That role does not exist in this kind of organisation.',
      );
    }
    const allowed = assignableRoles(auth, organisationId, organisation.kind);
    if (!allowed.includes(current.role)) throw roleNotAllowed(current.role);
    if (!allowed.includes(role)) throw roleNotAllowed(role);
    if (current.role !== role) {
      if (candidates.some((c) => c.userId === current.userId && c.role === role)) {
        throw AppError.conflict('already_member', 'This person already has that role here.');
      }
      if (!keepsAManager(organisation.kind, candidates, { membershipId, role })) {
        throw AppError.conflict(
          'last_manager',
          'This is the last person who can manage members here. Give someone else that role first.',
        );
      }
      await updateMembershipRole(m, membershipId, role);
      await insertAuditEvent(m, {
        at: now,
        actorUserId: auth.user.id,
        organisationId,
        action: 'member.role_changed',
        subject: `membership:${membershipId}`,
        detail: { userId: current.userId, from: current.role, to: role },
        requestId: ctx.requestId,
      });
    }
    const member = await getMember(m, organisationId, membershipId);
    if (!member) throw new Error('membership vanished inside its own transaction');
    return member;
  });
}

/**
 * Deactivates or reactivates the person behind a membership. Deactivating ends all their
 * sessions in the same transaction. Nobody deactivates themselves, the last manager stays,
 * and people who also belong to other organisations are left to the platform admin.
 */
export async function setMemberActive(
  deps: IdentityDeps,
  auth: AuthContext,
  organisationId: number,
  membershipId: number,
  active: boolean,
  ctx: RequestContext,
): Promise<Member> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const organisation = await lockOrganisation(m, organisationId);
    const candidates = await lockManagingCandidates(m, organisationId);
    const current = candidates.find((c) => c.membershipId === membershipId);
    if (!current) throw AppError.notFound('member_not_found', 'There is no such member here.');
    if (!assignableRoles(auth, organisationId, organisation.kind).includes(current.role)) {
      throw roleNotAllowed(current.role);
    }
    if (!active && current.userId === auth.user.id) {
      throw AppError.conflict('cannot_deactivate_self', 'You cannot deactivate your own account.');
    }
    if (!auth.isPlatformAdmin) {
      const elsewhere = (await organisationIdsOfUser(m, current.userId)).filter(
        (id) => id !== organisationId,
      );
      if (elsewhere.length > 0) {
        throw AppError.conflict(
          'member_of_other_organisations',
          'This person also belongs to other organisations. Ask the marketplace admin to change their access.',
        );
      }
    }
    if (
      !active &&
      !keepsAManager(organisation.kind, candidates, {
        membershipId,
        deactivateUserId: current.userId,
      })
    ) {
      throw AppError.conflict(
        'last_manager',
        'This is the last person who can manage members here. Give someone else that role first.',
      );
    }
    const user = await findUserById(m, current.userId, true);
    if (!user) throw AppError.notFound('member_not_found', 'There is no such member here.');
    if (user.active !== active) {
      await updateUser(m, user.id, { active }, now);
      const sessionsEnded = active ? 0 : await deleteSessionsOfUser(m, user.id);
      await insertAuditEvent(m, {
        at: now,
        actorUserId: auth.user.id,
        organisationId,
        action: active ? 'member.reactivated' : 'member.deactivated',
        subject: `membership:${membershipId}`,
        detail: active ? { userId: user.id } : { userId: user.id, sessionsEnded },
        requestId: ctx.requestId,
      });
    }
    const member = await getMember(m, organisationId, membershipId);
    if (!member) throw new Error('membership vanished inside its own transaction');
    return member;
  });
}
