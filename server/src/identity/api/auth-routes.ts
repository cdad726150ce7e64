import type { Request } from 'express';
import {
  acceptInvitationRequest,
  changePasswordRequest,
  csrfResponse,
  errorBody,
  loginRequest,
  meResponse,
  passwordResetRequest,
  resetPasswordRequest,
  updateProfileRequest,
} from '@evalon/contracts';
import type { Config } from '../../config';
import { currentAuth } from '../../http/access';
import { ensureCsrfToken } from '../../http/csrf';
import { publicWriteLimiter, signInLimiters } from '../../http/rate-limits';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { endSession, startSignedInSession } from '../../http/session';
import {
  changePassword,
  requestPasswordReset,
  resetPassword,
  updateProfile,
} from '../domain/account';
import type { IdentityDeps, RequestContext } from '../domain/deps';
import { acceptInvitation } from '../domain/members';
import { signInWithPassword } from '../domain/sign-in';
import { loadSessionUser } from '../data-access/identity-repository';
import { AppError } from '../../errors';
import { createGoogleHandlers } from './google';

/** Audit facts from the request. */
export function requestContext(req: Request): RequestContext {
  return { requestId: req.id === undefined ? null : String(req.id) };
}

const error = (description: string) => ({ description, schema: errorBody });

/** `/api/auth`: session, sign-in (password and Google), passwords, invitations, own profile. */
export function authRoutes(
  config: Config,
  deps: IdentityDeps,
  catalogue: CatalogueEntry[],
): ApiRouter {
  const api = new ApiRouter('/api/auth', 'Authentication', catalogue);
  const secure = config.http.secureCookies;
  const google = createGoogleHandlers(config, deps);
  const publicWrites = publicWriteLimiter(config.loginLimits);

  const signedInUser = async (userId: number) => {
    const loaded = await loadSessionUser(deps.dataSource.manager, userId);
    if (!loaded) throw AppError.unauthorized();
    return loaded.user;
  };

  api.route(
    {
      method: 'get',
      path: '/csrf',
      summary: 'Make sure the XSRF-TOKEN cookie is set',
      description: 'Call once before the first changing request (such as sign-in).',
      access: { public: true },
      responses: { 200: { description: 'The token the cookie carries.', schema: csrfResponse } },
    },
    ({ req, res }) => {
      res.json({ csrfToken: ensureCsrfToken(req, res, secure) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/login',
      summary: 'Sign in with e-mail and password',
      access: { public: true },
      body: loginRequest,
      before: signInLimiters(config.loginLimits, deps.dataSource),
      responses: {
        200: {
          description: 'Signed in; a new session cookie and XSRF-TOKEN are set.',
          schema: meResponse,
        },
        401: error('`invalid_credentials`, or `account_deactivated` when the password was right.'),
        422: error('The body is not valid.'),
        429: {
          ...error('Too many failed attempts.'),
          headers: { 'Retry-After': 'Seconds to wait.' },
        },
      },
    },
    async ({ req, res, body }) => {
      const userId = await signInWithPassword(deps, body, requestContext(req));
      await startSignedInSession(req, res, userId, secure);
      res.json({ user: await signedInUser(userId) });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/logout',
      summary: 'Sign out (ends the session)',
      access: { public: true },
      responses: { 204: { description: 'Signed out.' } },
    },
    async ({ req, res }) => {
      await endSession(req, res, secure);
      res.status(204).end();
    },
  );

  api.route(
    {
      method: 'get',
      path: '/me',
      summary: 'The signed-in person and their memberships',
      access: { authenticated: true },
      responses: {
        200: { description: 'Signed in.', schema: meResponse },
        401: error('Not signed in.'),
      },
    },
    ({ req, res }) => {
      res.json({ user: currentAuth(req).user });
    },
  );

  api.route(
    {
      method: 'patch',
      path: '/me',
      summary: 'Change your own name or time zone',
      access: { authenticated: true },
      body: updateProfileRequest,
      responses: {
        200: { description: 'Updated.', schema: meResponse },
        422: error('The body is not valid.'),
      },
    },
    async ({ req, res, body }) => {
      const user = await updateProfile(deps, currentAuth(req), body, requestContext(req));
      res.json({ user });
    },
  );

  api.route(
    {
      method: 'post',
      path: '/change-password',
      summary: 'Change your own password',
      description: 'Your other sessions end; this one stays signed in.',
      access: { authenticated: true },
      body: changePasswordRequest,
      responses: {
        204: { description: 'Changed.' },
        422: error('`invalid_current_password`, or the new password is not acceptable.'),
      },
    },
    async ({ req, res, body }) => {
      await changePassword(deps, currentAuth(req), body, req.sessionID, requestContext(req));
      res.status(204).end();
    },
  );

  api.route(
    {
      method: 'post',
      path: '/password-reset',
      summary: 'Ask for a password reset link by e-mail',
      description:
        'Always 202, whether or not the address has an account. The link expires in 1 hour.',
      access: { public: true },
      body: passwordResetRequest,
      before: [publicWrites],
      responses: { 202: { description: 'If the address has an account, a link is on its way.' } },
    },
    async ({ req, res, body }) => {
      await requestPasswordReset(deps, body.email, requestContext(req));
      res.status(202).end();
    },
  );

  api.route(
    {
      method: 'post',
      path: '/reset-password',
      summary: 'Set a new password with the token from a reset e-mail',
      description: 'Every session of that person ends; sign in again with the new password.',
      access: { public: true },
      body: resetPasswordRequest,
      before: [publicWrites],
      responses: {
        204: { description: 'Password set.' },
        400: error('`token_invalid`.'),
        410: error('`token_used` or `token_expired`.'),
      },
    },
    async ({ req, res, body }) => {
      await resetPassword(deps, body, requestContext(req));
      res.status(204).end();
    },
  );

  api.route(
    {
      method: 'post',
      path: '/accept-invitation',
      summary: 'Accept an invitation: set a password (and name) and sign in',
      access: { public: true },
      body: acceptInvitationRequest,
      before: [publicWrites],
      responses: {
        200: { description: 'Signed in.', schema: meResponse },
        400: error('`token_invalid`.'),
        410: error('`token_used` or `token_expired`.'),
      },
    },
    async ({ req, res, body }) => {
      const userId = await acceptInvitation(deps, body, requestContext(req));
      await startSignedInSession(req, res, userId, secure);
      res.json({ user: await signedInUser(userId) });
    },
  );

  api.route(
    {
      method: 'get',
      path: '/google',
      summary: 'Continue with Google: redirect to the provider',
      access: { public: true },
      responses: { 302: { description: 'To the provider’s sign-in page.' } },
    },
    ({ req, res, next }) => google.start(req, res, next),
  );

  api.route(
    {
      method: 'get',
      path: '/google/callback',
      summary: 'Where the provider sends the browser back',
      description:
        'Signs in an existing, active person with that verified e-mail, then redirects to `/`; ' +
        'otherwise to `/sign-in?error=<code>` (google_unknown, google_unverified, google_mismatch, ' +
        'google_cancelled, google_failed, account_deactivated).',
      access: { public: true },
      responses: { 302: { description: 'To `/` or `/sign-in?error=...`.' } },
    },
    ({ req, res, next }) => google.callback(req, res, next),
  );

  return api;
}
