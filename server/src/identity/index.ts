// The identity component's front door: other components and the app use only what is exported
// here.
import { RateLimits1765400060000 } from '../database/migrations/1765400060000-rate-limits';
import type { AppComponent } from '../app-services';
import { Identity1764633600000 } from '../database/migrations/1764633600000-identity';
import { UserAuthVersion1765300000000 } from '../database/migrations/1765300000000-user-auth-version';
import { UsersUpdatedIndex1765300030000 } from '../database/migrations/1765300030000-users-updated-index';
import { authRoutes } from './api/auth-routes';
import { memberRoutes } from './api/member-routes';
import { MembershipEntity, UserEntity, UserTokenEntity } from './data-access/entities';
import type { DataSource } from 'typeorm';
import { createLRU } from 'lru.min';
import { loadSessionUser, readAuthVersion } from './data-access/identity-repository';
import { toAuthContext, type AuthContext } from './domain/auth-context';
import type { IdentityDeps } from './domain/deps';

export { requestContext } from './api/auth-routes';
export {
  insertMembership,
  insertToken,
  insertUser,
  loadSessionUser,
  updateUser,
} from './data-access/identity-repository';
export { toAuthContext, type AuthContext } from './domain/auth-context';
export type { IdentityDeps } from './domain/deps';
export { hashPassword } from './domain/passwords';
export { managesOrganisation } from './domain/policy';
export { invitationLifetimeMs, newOneTimeToken } from './domain/tokens';

function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const inner of Object.values(value)) deepFreeze(inner);
  }
  return value;
}

/** How many signed-in people one process keeps in its cache (about 1 kB each). */
export const sessionUserCacheSize = 10_000;

/**
 * The session's person loader for `http/session.ts`: the user with their memberships as an
 * auth context, and whether the account is active; null for an unknown id.
 *
 * Each process keeps the loaded person per user (LRU) together with the `users.auth_version`
 * it was read at, and per request compares only that number (read with the session row, or a
 * primary-key lookup) instead of loading the person and their memberships. Database triggers bump the number on a role, membership,
 * deactivation or profile change, whichever process or tool made it, so the change shows on the
 * very next request on every process. Chosen over a short time-to-live with explicit
 * invalidation because that is only immediate in the process that made the change; the others
 * would serve the old roles until the entry expired.
 */
export function sessionUserLoader(dataSource: DataSource) {
  type Loaded = { auth: AuthContext; active: boolean; version: number };
  const cache = createLRU<number, Loaded>({ max: sessionUserCacheSize });
  return async (userId: number, knownVersion?: number | null) => {
    const cached = cache.get(userId);
    if (knownVersion === null) {
      cache.delete(userId);
      return null;
    }
    if (cached) {
      // The session store reads the version with the session (one round trip); read it here
      // only when the caller did not.
      const version = knownVersion ?? (await readAuthVersion(dataSource.manager, userId));
      if (version === null) {
        cache.delete(userId);
        return null;
      }
      if (version === cached.version) return cached;
    }
    const loaded = await loadSessionUser(dataSource.manager, userId);
    if (!loaded) {
      cache.delete(userId);
      return null;
    }
    // Shared by every request of this person until the version changes: frozen, so a route that
    // tried to change it in place would fail loudly instead of changing other requests' view.
    const entry: Loaded = {
      auth: deepFreeze(toAuthContext(loaded.user)),
      active: loaded.active,
      version: loaded.version,
    };
    cache.set(userId, entry);
    return entry;
  };
}

/**
 * People, memberships, sign-in and invitations. Its first migration also created the
 * organisations, sites, audit and session tables (the schema's first step).
 */
export const identityComponent: AppComponent = {
  name: 'identity',
  entities: [UserEntity, MembershipEntity, UserTokenEntity],
  migrations: [
    Identity1764633600000,
    UserAuthVersion1765300000000,
    UsersUpdatedIndex1765300030000,
    RateLimits1765400060000,
  ],
  routers: (ctx) => {
    const deps: IdentityDeps = {
      dataSource: ctx.dataSource,
      logger: ctx.logger,
      publicUrl: ctx.config.http.publicUrl,
      now: ctx.now,
    };
    return [authRoutes(ctx.config, deps, ctx.catalogue), memberRoutes(deps, ctx.catalogue)];
  },
};
