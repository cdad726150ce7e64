import type { Request, RequestHandler, Response } from 'express';
import session from 'express-session';
import createMySQLStore from 'express-mysql-session';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { csrfCookieName, newCsrfToken, writeCsrfCookie } from './csrf';
import { AppError } from '../errors';
import { createLRU } from 'lru.min';

/** Name of the session cookie. */
export const sessionCookieName = 'evalon.sid';

/**
 * express-session backed by the `sessions` table (created by a migration), sharing TypeORM's
 * connection pool. The cookie lives `idleTimeoutMs` and is renewed on every response
 * (`rolling`), which makes that the idle timeout; the store drops rows past their expiry.
 * Expired rows are swept by {@link sweepExpiredSessions}, not by a store timer.
 *
 * `rolling` makes express-session touch the store after every request, an UPDATE per request.
 * The stored expiry only has to be right to well under the idle timeout, so each process writes
 * it at most once per {@link touchIntervalMs} for a session (it may then lag the cookie's
 * expiry by up to that much); the cookie itself is still renewed on every response.
 */
export function createSessionMiddleware(config: Config, dataSource: DataSource): RequestHandler {
  const MySQLStore = createMySQLStore(session);
  const store = new MySQLStore(
    {
      createDatabaseTable: false,
      clearExpired: false,
      expiration: config.session.idleTimeoutMs,
      endConnectionOnClose: false,
      schema: { tableName: 'sessions' },
    },
    // TypeORM's mysql2 pool (callback API), which the store knows how to use.
    (dataSource.driver as unknown as { pool: unknown }).pool,
  );
  readAuthVersionWithSession(store, (dataSource.driver as unknown as { pool: ExecutePool }).pool);
  throttleTouches(store, touchIntervalMs(config));
  return session({
    name: sessionCookieName,
    secret: config.session.secret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.http.secureCookies,
      maxAge: config.session.idleTimeoutMs,
      path: '/',
    },
  });
}

type ExecutePool = {
  execute(
    sql: string,
    values: unknown[],
    cb: (
      err: Error | null,
      rows: { data: string | null; expires: number; v: number | null }[],
    ) => void,
  ): void;
};

/** `users.auth_version` read with a request's session, by request (see {@link loadSignedInUser}). */
const authVersions = new WeakMap<Request, number | null>();
const authVersionKey = Symbol('authVersion');

/**
 * Reads a session together with its person's `users.auth_version` (the identity component's
 * change counter, migration 1765300000000) in one prepared statement, so a signed-in request
 * costs one round trip before the route instead of two. Same expiry rule as the store's own
 * `get`: a row past `expires` is no session.
 */
function readAuthVersionWithSession(store: session.Store, pool: ExecutePool): void {
  const createSession = store.createSession.bind(store);
  store.get = (sid, cb) => {
    pool.execute(
      `SELECT s.data, s.expires, u.auth_version AS v
         FROM sessions s LEFT JOIN users u ON u.id = s.user_id
        WHERE s.session_id = ?`,
      [sid],
      (err, rows) => {
        if (err) return cb(err);
        const row = rows[0];
        if (!row || row.data === null || row.expires < Math.round(Date.now() / 1000)) {
          return cb(null, null);
        }
        let data: session.SessionData & { [authVersionKey]?: number | null };
        try {
          data = JSON.parse(row.data) as session.SessionData;
        } catch (parseError) {
          return cb(parseError);
        }
        data[authVersionKey] = row.v === null ? null : Number(row.v);
        cb(null, data);
      },
    );
  };
  store.createSession = (req, data) => {
    const version = (data as { [authVersionKey]?: number | null })[authVersionKey];
    if (version !== undefined) authVersions.set(req, version);
    return createSession(req, data);
  };
}

/** At most how often one process rewrites a session's stored expiry: 30 s, less for short idle timeouts. */
export function touchIntervalMs(config: Config): number {
  return Math.min(30_000, Math.floor(config.session.idleTimeoutMs / 100));
}

type TouchFn = (sid: string, data: session.SessionData, cb?: (err?: unknown) => void) => unknown;

/** Skips a store's touch of a session written or touched by this process in the last `intervalMs`. */
function throttleTouches(store: session.Store, intervalMs: number): void {
  const written = createLRU<string, number>({ max: 50_000 });
  const touch = (store.touch as TouchFn).bind(store);
  const set = store.set.bind(store);
  const destroy = store.destroy.bind(store);
  store.set = (sid, data, cb) => {
    written.set(sid, Date.now());
    return set(sid, data, cb);
  };
  store.destroy = (sid, cb) => {
    written.delete(sid);
    return destroy(sid, cb);
  };
  store.touch = (sid, data, cb) => {
    const last = written.get(sid);
    const now = Date.now();
    if (last !== undefined && now - last < intervalMs) return cb?.();
    written.set(sid, now);
    return touch(sid, data, cb);
  };
}

/** Deletes session rows past their expiry; returns how many went. */
export async function sweepExpiredSessions(dataSource: DataSource): Promise<number> {
  const result: { affectedRows?: number } = await dataSource.query(
    'DELETE FROM sessions WHERE expires < UNIX_TIMESTAMP()',
  );
  return result.affectedRows ?? 0;
}

function promisify(fn: (cb: (err?: unknown) => void) => void): Promise<void> {
  return new Promise((resolve, reject) => fn((err) => (err ? reject(err) : resolve())));
}

/**
 * Starts a signed-in session: a new session id (so an id planted before sign-in is worthless),
 * the user and sign-in time for the absolute timeout, and a fresh CSRF token and cookie.
 */
export async function startSignedInSession(
  req: Request,
  res: Response,
  userId: number,
  secureCookies: boolean,
): Promise<void> {
  await promisify((cb) => req.session.regenerate(cb));
  req.session.userId = userId;
  req.session.authenticatedAt = Date.now();
  const token = newCsrfToken();
  req.session.csrfToken = token;
  await promisify((cb) => req.session.save(cb));
  writeCsrfCookie(res, token, secureCookies);
}

/** Ends the session in the store and tells the browser to forget both cookies. */
export async function endSession(
  req: Request,
  res: Response,
  secureCookies: boolean,
): Promise<void> {
  if (req.session) await promisify((cb) => req.session.destroy(cb));
  const options = { path: '/', sameSite: 'lax' as const, secure: secureCookies };
  res.clearCookie(sessionCookieName, { ...options, httpOnly: true });
  res.clearCookie(csrfCookieName, options);
}

/** Why a session was ended while loading it, kept for the access check to explain a 401. */
export interface EndedSession {
  code: 'session_expired' | 'account_deactivated' | 'not_signed_in';
  message: string;
}

/** The signed-in person behind a session, as the identity component loads them (or null). */
export type SessionUserLoader = (
  userId: number,
  /** `users.auth_version` as read with the session: null for no such user, undefined unknown. */
  knownVersion?: number | null,
) => Promise<{ auth: NonNullable<Request['auth']>; active: boolean } | null>;

/**
 * Loads the signed-in person on every API request (through `loadUser`, which `app.ts` takes
 * from the identity component's front door), so a deactivation or a
 * role change takes effect at once. Sessions past the absolute timeout, or of people who have
 * been deactivated, are ended; the request goes on as anonymous and a protected route answers
 * 401 with the reason (see `access`), while public routes such as sign-in still work.
 */
export function loadSignedInUser(config: Config, loadUser: SessionUserLoader): RequestHandler {
  return async (req, res, next) => {
    const userId = req.session?.userId;
    if (userId === undefined) return next();
    const startedAt = req.session.authenticatedAt ?? 0;
    let ended: EndedSession | null = null;
    if (Date.now() - startedAt > config.session.absoluteTimeoutMs) {
      ended = {
        code: 'session_expired',
        message: 'Your session has ended. Sign in again to continue.',
      };
    } else {
      const loaded = await loadUser(userId, authVersions.get(req));
      if (loaded?.active) {
        req.auth = loaded.auth;
        return next();
      }
      ended = loaded
        ? {
            code: 'account_deactivated',
            message: 'This account has been deactivated. Ask your organisation’s administrator.',
          }
        : { code: 'not_signed_in', message: 'Sign in to continue.' };
    }
    // Regenerate rather than destroy: the old row goes, and later middleware (CSRF, OAuth
    // state, sign-in) still finds an empty session to work with.
    await promisify((cb) => req.session.regenerate(cb));
    res.clearCookie(sessionCookieName, {
      path: '/',
      httpOnly: true,
      sameSite: 'lax',
      secure: config.http.secureCookies,
    });
    res.locals.endedSession = ended;
    next();
  };
}

/** The 401 to answer when a protected route finds no signed-in person. */
export function notSignedInError(res: Response): AppError {
  const ended = res.locals.endedSession as EndedSession | undefined;
  return ended ? AppError.unauthorized(ended.code, ended.message) : AppError.unauthorized();
}
