import type { Request, RequestHandler } from 'express';
import { rateLimit, type ClientRateLimitInfo, type Options, type Store } from 'express-rate-limit';
import { RateLimiterMySQL } from 'rate-limiter-flexible';
import type { DataSource } from 'typeorm';
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
 * An express-rate-limit store whose counters live in MariaDB's `rate_limits` table through
 * rate-limiter-flexible's MySQL store, on the app's own connection pool: every server process
 * sees the same counts. rate-limiter-flexible keeps the counting atomic (an upsert per hit) and
 * the window (a key's count starts again once its `expire` has passed).
 */
export class MariaDbLimitStore implements Store {
  /** Counts are shared between processes, not kept in this one. */
  readonly localKeys = false;
  private limiter: RateLimiterMySQL | null = null;

  constructor(
    private readonly dataSource: DataSource,
    /** Distinguishes the counters of one limiter from another's in the shared table. */
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    // TypeORM's MySQL driver keeps mysql2's callback pool, which is what the store expects.
    const pool = (this.dataSource.driver as unknown as { pool: unknown }).pool;
    this.limiter = new RateLimiterMySQL({
      storeClient: pool,
      storeType: 'pool',
      dbName: this.dataSource.options.database as string,
      tableName: 'rate_limits',
      // Made by a migration; the store would otherwise try to create it.
      tableCreated: true,
      // No timer per limiter: an expired row is overwritten by the next hit on its key.
      clearExpiredByTimeout: false,
      keyPrefix: this.prefix,
      // express-rate-limit compares the count with its limit; this store only counts.
      points: 2_000_000_000,
      duration: Math.max(1, Math.ceil(options.windowMs / 1000)),
    });
  }

  private get store(): RateLimiterMySQL {
    if (!this.limiter) throw new Error('MariaDbLimitStore used before init');
    return this.limiter;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const res = await this.store.get(key);
    if (!res) return undefined;
    return { totalHits: res.consumedPoints, resetTime: new Date(Date.now() + res.msBeforeNext) };
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const res = await this.store.consume(key, 1);
    return { totalHits: res.consumedPoints, resetTime: new Date(Date.now() + res.msBeforeNext) };
  }

  async decrement(key: string): Promise<void> {
    await this.store.reward(key, 1);
  }

  async resetKey(key: string): Promise<void> {
    await this.store.delete(key);
  }
}

/**
 * Sign-in limits: failed attempts per client address and per account (e-mail). Successful
 * sign-ins are taken back off the count. With a data source the counters are kept in MariaDB
 * ({@link MariaDbLimitStore}), so several server processes keep one limit; without one, in
 * this process.
 */
export function signInLimiters(
  limits: Config['loginLimits'],
  dataSource?: DataSource,
): RequestHandler[] {
  const store = (prefix: string) =>
    dataSource ? { store: new MariaDbLimitStore(dataSource, prefix) } : {};
  const common = {
    windowMs: limits.windowMs,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7' as const,
    legacyHeaders: false,
    handler: tooMany(limits.windowMs),
  };
  const perIp = rateLimit({ ...common, ...store('signin-ip'), limit: limits.maxFailuresPerIp });
  const perAccount = rateLimit({
    ...common,
    ...store('signin-account'),
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
