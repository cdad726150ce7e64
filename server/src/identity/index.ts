// The identity component's front door: other components and the app use only what is exported
// here.
import type { AppComponent } from '../app-services';
import { Identity1764633600000 } from '../database/migrations/1764633600000-identity';
import { authRoutes } from './api/auth-routes';
import { memberRoutes } from './api/member-routes';
import { MembershipEntity, UserEntity, UserTokenEntity } from './data-access/entities';
import type { DataSource } from 'typeorm';
import { loadSessionUser } from './data-access/identity-repository';
import { toAuthContext } from './domain/auth-context';
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

/**
 * The session's person loader for `http/session.ts`: the user with their memberships as an
 * auth context, and whether the account is active; null for an unknown id.
 */
export function sessionUserLoader(dataSource: DataSource) {
  return async (userId: number) => {
    const loaded = await loadSessionUser(dataSource.manager, userId);
    return loaded ? { auth: toAuthContext(loaded.user), active: loaded.active } : null;
  };
}

/**
 * People, memberships, sign-in and invitations. Its first migration also created the
 * organisations, sites, audit and session tables (the schema's first step).
 */
export const identityComponent: AppComponent = {
  name: 'identity',
  entities: [UserEntity, MembershipEntity, UserTokenEntity],
  migrations: [Identity1764633600000],
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
