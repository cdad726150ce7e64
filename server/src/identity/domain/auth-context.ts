import type { Membership, Role, SessionUser } from '@evalon/contracts';

/** The signed-in person as every route sees them, re-read from the database on each request. */
export interface AuthContext {
  user: SessionUser;
  /** Whether the person holds `admin` in some organisation (the platform operator). */
  isPlatformAdmin: boolean;
}

/** Roles the person holds in one organisation. */
export function rolesIn(auth: AuthContext, organisationId: number): Role[] {
  return auth.user.memberships
    .filter((m: Membership) => m.organisationId === organisationId)
    .map((m) => m.role);
}

/** Builds the context from a user and their memberships. */
export function toAuthContext(user: SessionUser): AuthContext {
  return { user, isPlatformAdmin: user.memberships.some((m) => m.role === 'admin') };
}
