import type { Request, RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { Config } from '../config';
import { AppError } from '../errors';

function minutesWords(ms: number): string {
  const minutes = Math.max(1, Math.round(ms / 60_000));
  return minutes === 1 ? '1 minute' : `${minutes} minutes`;
}

function tooMany(windowMs: number): RequestHandler {
  // express-rate-limit has already set Retry-After when it calls this.
  return (_req, _res, next) =>
    next(
      new AppError(
        429,
        'too_many_attempts',
        `Too many sign-in attempts. Wait up to ${minutesWords(windowMs)} and try again, or reset your password.`,
      ),
    );
}

/**
 * Sign-in limits: failed attempts per client address and per account (e-mail). Successful
 * sign-ins are taken back off the count. Counters live in this process; several server
 * processes would need a shared store (e.g. in MariaDB) to keep the same limits.
 */
export function signInLimiters(limits: Config['loginLimits']): RequestHandler[] {
  const common = {
    windowMs: limits.windowMs,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7' as const,
    legacyHeaders: false,
    handler: tooMany(limits.windowMs),
  };
  const perIp = rateLimit({ ...common, limit: limits.maxFailuresPerIp });
  const perAccount = rateLimit({
    ...common,
    limit: limits.maxFailuresPerAccount,
    keyGenerator: (req: Request) => {
      const email: unknown = (req.body as { email?: unknown } | undefined)?.email;
      return `account:${typeof email === 'string' ? email.trim().toLowerCase() : ''}`;
    },
  });
  return [perIp, perAccount];
}

/**
 * A per-address limit for the other unauthenticated write routes (reset requests, token use),
 * so nobody can flood mailboxes or guess tokens quickly. Every request counts here.
 */
export function publicWriteLimiter(limits: Config['loginLimits']): RequestHandler {
  return rateLimit({
    windowMs: limits.windowMs,
    limit: limits.maxFailuresPerIp,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, _res, next) =>
      next(
        new AppError(
          429,
          'too_many_requests',
          `Too many requests. Wait up to ${minutesWords(limits.windowMs)} and try again.`,
        ),
      ),
  });
}
