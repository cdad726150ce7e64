import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler, Response } from 'express';
import { AppError } from '../errors';

/** Cookie the browser app reads (Angular's HttpClient default name). */
export const csrfCookieName = 'XSRF-TOKEN';
/** Header the browser app sends back (Angular's HttpClient default name). */
export const csrfHeaderName = 'x-xsrf-token';

const unsafeMethods = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);

/**
 * Paths (below /api) that skip the header check. Webhooks come from servers, not browsers,
 * and must prove themselves with a signature instead. The Google callback is a GET, so it is
 * never checked anyway; it is protected by the OAuth `state` parameter.
 */
const exemptPrefixes = ['/webhooks/'];

/** A fresh random token (256 bits, URL-safe). */
export function newCsrfToken(): string {
  return randomBytes(32).toString('base64url');
}

/** Whether two tokens are equal, in constant time. */
export function tokensMatch(expected: string, given: string): boolean {
  const a = Buffer.from(expected);
  const b = Buffer.from(given);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** Sets the readable cookie to the session's token. */
export function writeCsrfCookie(res: Response, token: string, secure: boolean): void {
  res.cookie(csrfCookieName, token, { httpOnly: false, sameSite: 'lax', secure, path: '/' });
}

/** Makes sure the session has a token and the browser has the cookie; returns the token. */
export function ensureCsrfToken(req: Request, res: Response, secure: boolean): string {
  let token = req.session.csrfToken;
  if (!token) {
    token = newCsrfToken();
    req.session.csrfToken = token;
  }
  if (req.cookies?.[csrfCookieName] !== token) writeCsrfCookie(res, token, secure);
  return token;
}

/**
 * Synchroniser-token check for the API (mounted on /api after the session): every changing
 * request must echo the session's token in `X-XSRF-TOKEN`. Reading requests refresh the
 * cookie when a session already has a token, so a reload always leaves the browser in step.
 */
export function csrfProtection(options: { secureCookies: boolean }): RequestHandler {
  return (req, res, next) => {
    if (!unsafeMethods.has(req.method)) {
      const token = req.session.csrfToken;
      if (token && req.cookies?.[csrfCookieName] !== token) {
        writeCsrfCookie(res, token, options.secureCookies);
      }
      return next();
    }
    if (exemptPrefixes.some((prefix) => req.path.startsWith(prefix))) return next();
    const expected = req.session.csrfToken;
    const given = req.get(csrfHeaderName);
    if (!expected || !given || !tokensMatch(expected, given)) {
      return next(
        AppError.forbidden(
          'csrf_failed',
          'This request could not be verified. Reload the page and try again.',
        ),
      );
    }
    next();
  };
}
