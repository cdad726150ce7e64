import type { LoginRequest, SignInRedirectError } from '@evalon/contracts';
import { AppError } from '../../errors';
import { insertAuditEvent } from '../../audit';
import {
  findUserByEmail,
  findUserByGoogleSubject,
  updateUser,
  useOpenTokens,
} from '../data-access/identity-repository';
import type { IdentityDeps, RequestContext } from './deps';
import { verifyPassword } from './passwords';

/** The one answer for a wrong e-mail or password, so neither is revealed on its own. */
export const invalidCredentials = () =>
  new AppError(401, 'invalid_credentials', 'E-mail or password is not right.');

/** The answer for a deactivated person who knew the right password. */
export const accountDeactivated = () =>
  new AppError(
    401,
    'account_deactivated',
    'This account has been deactivated. Ask your organisation’s administrator.',
  );

/**
 * Checks e-mail and password and records the sign-in. Unknown e-mail, no password set, wrong
 * password and deactivated-with-wrong-password all answer `invalid_credentials`; only the right
 * password reveals that an account is deactivated. Returns the user id for the session.
 */
export async function signInWithPassword(
  deps: IdentityDeps,
  credentials: LoginRequest,
  ctx: RequestContext,
): Promise<number> {
  const user = await findUserByEmail(deps.dataSource.manager, credentials.email);
  const matches = await verifyPassword(user?.passwordHash ?? null, credentials.password);
  if (!user || !matches) throw invalidCredentials();
  if (!user.active) throw accountDeactivated();
  await recordSignIn(deps, user.id, 'password', ctx);
  return user.id;
}

async function recordSignIn(
  deps: IdentityDeps,
  userId: number,
  method: 'password' | 'google',
  ctx: RequestContext,
  extra: { googleSubject?: string } = {},
): Promise<void> {
  const now = deps.now();
  await deps.dataSource.transaction(async (m) => {
    await updateUser(m, userId, { lastSignInAt: now, ...extra }, now);
    if (method === 'google') {
      // Google proved the invited address, so open invitation links are no longer needed.
      await useOpenTokens(m, userId, 'invitation', now);
    }
    await insertAuditEvent(m, {
      at: now,
      actorUserId: userId,
      organisationId: null,
      action: 'user.signed_in',
      subject: `user:${userId}`,
      detail: { method },
      requestId: ctx.requestId,
    });
  });
}

/** What Google (or the local stand-in) told us about the person. */
export interface GoogleIdentity {
  subject: string;
  email: string | null;
  emailVerified: boolean;
}

/** Outcome of a Google sign-in: a user id, or a code for `/sign-in?error=`. */
export type GoogleSignInResult = { userId: number } | { error: SignInRedirectError };

/**
 * Signs in an existing, active person whose verified Google address matches their Evalon
 * e-mail; nobody is created here (people join by invitation). The Google subject is linked at
 * the first sign-in and must match afterwards, so a reassigned address cannot take over.
 */
export async function signInWithGoogle(
  deps: IdentityDeps,
  identity: GoogleIdentity,
  ctx: RequestContext,
): Promise<GoogleSignInResult> {
  if (!identity.email) return { error: 'google_unknown' };
  if (!identity.emailVerified) return { error: 'google_unverified' };
  const user = await findUserByEmail(deps.dataSource.manager, identity.email.trim().toLowerCase());
  if (!user) return { error: 'google_unknown' };
  if (!user.active) return { error: 'account_deactivated' };
  if (user.googleSubject && user.googleSubject !== identity.subject)
    return { error: 'google_mismatch' };
  if (!user.googleSubject) {
    const holder = await findUserByGoogleSubject(deps.dataSource.manager, identity.subject);
    if (holder && holder.id !== user.id) return { error: 'google_mismatch' };
  }
  await recordSignIn(
    deps,
    user.id,
    'google',
    ctx,
    user.googleSubject ? {} : { googleSubject: identity.subject },
  );
  return { userId: user.id };
}
