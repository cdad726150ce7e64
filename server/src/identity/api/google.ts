import type { Request, RequestHandler, Response } from 'express';
import { Passport } from 'passport';
import {
  Strategy as GoogleStrategy,
  type Profile,
  type VerifyCallback,
} from 'passport-google-oauth20';
import type { SignInRedirectError } from '@evalon/contracts';
import type { Config } from '../../config';
import { startSignedInSession } from '../../http/session';
import type { IdentityDeps } from '../domain/deps';
import { signInWithGoogle, type GoogleSignInResult } from '../domain/sign-in';

/** The two handlers behind `GET /api/auth/google` and its callback. */
export interface GoogleHandlers {
  start: RequestHandler;
  callback: RequestHandler;
}

/**
 * "Continue with Google" through passport-google-oauth20. The three provider URLs come from
 * configuration (the local stand-in by default). `state` and PKCE tie the callback to the
 * browser session that started it, which is what protects this GET from cross-site use.
 */
export function createGoogleHandlers(config: Config, deps: IdentityDeps): GoogleHandlers {
  const passport = new Passport();
  const strategy = new GoogleStrategy(
    {
      clientID: config.google.clientId,
      clientSecret: config.google.clientSecret,
      callbackURL: `${config.http.publicUrl}/api/auth/google/callback`,
      authorizationURL: config.google.authorizationUrl,
      tokenURL: config.google.tokenUrl,
      userProfileURL: config.google.userInfoUrl,
      scope: ['openid', 'email', 'profile'],
      state: true,
      pkce: true,
      passReqToCallback: true,
    },
    (
      req: Request,
      _accessToken: string,
      _refreshToken: string,
      profile: Profile,
      done: VerifyCallback,
    ) => {
      const first = profile.emails?.[0];
      // The OpenID profile parser copies `email_verified` into `verified` (boolean or "true").
      const verified = first
        ? String((first as { verified?: unknown }).verified) === 'true'
        : false;
      signInWithGoogle(
        deps,
        { subject: profile.id, email: first?.value ?? null, emailVerified: verified },
        { requestId: String(req.id ?? '') || null },
      ).then(
        (result) => done(null, result as unknown as Express.User),
        (err: unknown) => done(err as Error),
      );
    },
  );
  // Send the access token to /userinfo in a header, not in the URL where logs would keep it.
  (
    strategy as unknown as { _oauth2: { useAuthorizationHeaderforGET(use: boolean): void } }
  )._oauth2.useAuthorizationHeaderforGET(true);
  passport.use(strategy);

  const redirectWithError = (res: Response, code: SignInRedirectError) =>
    res.redirect(302, `/sign-in?error=${code}`);

  const start: RequestHandler = (req, res, next) => {
    passport.authenticate('google', { session: false })(req, res, next);
  };

  const callback: RequestHandler = (req, res, next) =>
    new Promise<void>((resolve, reject) => {
      passport.authenticate(
        'google',
        { session: false },
        (err: unknown, result: GoogleSignInResult | false | undefined) => {
          const finish = async () => {
            if (err) {
              req.log?.warn({ err }, 'Google sign-in failed');
              return redirectWithError(res, 'google_failed');
            }
            if (!result) {
              // No result without an error: the person cancelled, or state/PKCE did not match.
              return redirectWithError(
                res,
                req.query.error === 'access_denied' ? 'google_cancelled' : 'google_failed',
              );
            }
            if ('error' in result) return redirectWithError(res, result.error);
            await startSignedInSession(req, res, result.userId, config.http.secureCookies);
            res.redirect(302, '/');
          };
          finish().then(resolve, reject);
        },
      )(req, res, (e?: unknown) => (e ? reject(e) : resolve()));
    }).catch(next);

  return { start, callback };
}
