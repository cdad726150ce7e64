import type {
  ChangePasswordRequest,
  ResetPasswordRequest,
  SessionUser,
  UpdateProfileRequest,
} from '@evalon/contracts';
import { insertAuditEvent } from '../../audit';
import { passwordResetEmail } from '@evalon/messages';
import { enqueueEmail } from '../../notifications';
import { AppError } from '../../errors';
import {
  deleteSessionsOfUser,
  findUserByEmail,
  findUserById,
  insertToken,
  loadSessionUser,
  lockTokenByHash,
  updateUser,
  useOpenTokens,
} from '../data-access/identity-repository';
import type { AuthContext } from './auth-context';
import type { IdentityDeps, RequestContext } from './deps';
import { assertTokenUsable } from './members';
import { hashPassword, verifyPassword } from './passwords';
import { hashToken, newOneTimeToken, passwordResetLifetimeMs } from './tokens';

/**
 * Starts a password reset. Whether or not the address has an account, the caller answers the
 * same (202); the e-mail goes into the outbox in the same transaction as the token and leaves
 * from the worker, so the response time does not depend on the mail server either. Earlier reset
 * links of that person stop working.
 */
export async function requestPasswordReset(
  deps: IdentityDeps,
  email: string,
  ctx: RequestContext,
): Promise<void> {
  const now = deps.now();
  const { token, tokenHash } = newOneTimeToken();
  const expiresAt = new Date(now.getTime() + passwordResetLifetimeMs);
  await deps.dataSource.transaction(async (m) => {
    const found = await findUserByEmail(m, email, true);
    if (!found || !found.active) return;
    await useOpenTokens(m, found.id, 'password_reset', now);
    await insertToken(
      m,
      {
        userId: found.id,
        purpose: 'password_reset',
        tokenHash,
        organisationId: null,
        createdByUserId: null,
        expiresAt,
      },
      now,
    );
    await insertAuditEvent(m, {
      at: now,
      actorUserId: null,
      organisationId: null,
      action: 'user.password_reset_requested',
      subject: `user:${found.id}`,
      requestId: ctx.requestId,
    });
    await enqueueEmail(
      m,
      passwordResetEmail({
        to: found.email,
        name: found.name,
        link: `${deps.publicUrl}/reset-password?token=${encodeURIComponent(token)}`,
        expiresAt,
      }),
      now,
    );
  });
}

/** Sets a new password with a reset token; every session of that person ends. */
export async function resetPassword(
  deps: IdentityDeps,
  request: ResetPasswordRequest,
  ctx: RequestContext,
): Promise<void> {
  const passwordHash = await hashPassword(request.password);
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    const row = await lockTokenByHash(m, hashToken(request.token), 'password_reset');
    assertTokenUsable(row, now, 'reset');
    const user = row ? await findUserById(m, row.userId, true) : null;
    if (!row || !user)
      throw AppError.badRequest('token_invalid', 'This password reset link is not valid.');
    if (!user.active) {
      throw AppError.forbidden(
        'account_deactivated',
        'This account has been deactivated. Ask your organisation’s administrator.',
      );
    }
    await updateUser(m, user.id, { passwordHash }, now);
    await useOpenTokens(m, user.id, 'password_reset', now);
    // Someone who resets a password has no password yet if invited: the invitation is done too.
    await useOpenTokens(m, user.id, 'invitation', now);
    const sessionsEnded = await deleteSessionsOfUser(m, user.id);
    await insertAuditEvent(m, {
      at: now,
      actorUserId: user.id,
      organisationId: null,
      action: 'user.password_reset',
      subject: `user:${user.id}`,
      detail: { sessionsEnded },
      requestId: ctx.requestId,
    });
  });
}

/** Changes the person's own name and/or time zone; answers with the updated person. */
export async function updateProfile(
  deps: IdentityDeps,
  auth: AuthContext,
  change: UpdateProfileRequest,
  ctx: RequestContext,
): Promise<SessionUser> {
  const now = deps.now();
  return deps.dataSource.transaction(async (m) => {
    const before = await findUserById(m, auth.user.id, true);
    if (!before) throw AppError.unauthorized();
    const changes: { name?: string; timeZone?: string | null } = {};
    if (change.name !== undefined && change.name !== before.name) changes.name = change.name;
    if (change.timeZone !== undefined && change.timeZone !== before.timeZone)
      changes.timeZone = change.timeZone;
    if (Object.keys(changes).length > 0) {
      await updateUser(m, before.id, changes, now);
      await insertAuditEvent(m, {
        at: now,
        actorUserId: before.id,
        organisationId: null,
        action: 'user.profile_updated',
        subject: `user:${before.id}`,
        detail: Object.fromEntries(
          Object.entries(changes).map(([k, v]) => [
            k,
            { from: before[k as keyof typeof changes], to: v },
          ]),
        ),
        requestId: ctx.requestId,
      });
    }
    const loaded = await loadSessionUser(m, before.id);
    if (!loaded) throw AppError.unauthorized();
    return loaded.user;
  });
}

/**
 * Changes the person's password after checking the current one. Their other sessions end;
 * the one making the change stays signed in.
 */
export async function changePassword(
  deps: IdentityDeps,
  auth: AuthContext,
  request: ChangePasswordRequest,
  currentSessionId: string,
  ctx: RequestContext,
): Promise<void> {
  const user = await findUserById(deps.dataSource.manager, auth.user.id);
  if (!user) throw AppError.unauthorized();
  if (!(await verifyPassword(user.passwordHash, request.currentPassword))) {
    throw AppError.field(
      'invalid_current_password',
      'currentPassword',
      'Your current password is not right.',
    );
  }
  const passwordHash = await hashPassword(request.newPassword);
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    await updateUser(m, user.id, { passwordHash }, now);
    const sessionsEnded = await deleteSessionsOfUser(m, user.id, currentSessionId);
    await insertAuditEvent(m, {
      at: now,
      actorUserId: user.id,
      organisationId: null,
      action: 'user.password_changed',
      subject: `user:${user.id}`,
      detail: { otherSessionsEnded: sessionsEnded },
      requestId: ctx.requestId,
    });
  });
}
