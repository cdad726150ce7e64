import type { Role } from '@evalon/contracts';
import type { AuthContext } from '../../identity';

/**
 * Which organisations a person acts for, by role. Pure: the memberships come with the session,
 * so these checks cost no query.
 */

/** Ids of organisations where the person holds one of `roles`. */
export function organisationsWithRole(auth: AuthContext, roles: readonly Role[]): number[] {
  return [
    ...new Set(
      auth.user.memberships.filter((m) => roles.includes(m.role)).map((m) => m.organisationId),
    ),
  ];
}

/** Whether the person is a fleet manager of the lender (who edits its catalogue and approves). */
export function isFleetManagerOf(auth: AuthContext, lenderId: number): boolean {
  return auth.user.memberships.some(
    (m) => m.organisationId === lenderId && m.role === 'fleet_manager',
  );
}

/** Whether the person works for the lender (fleet manager or coordinator). */
export function worksForLender(auth: AuthContext, lenderId: number): boolean {
  return auth.user.memberships.some(
    (m) =>
      m.organisationId === lenderId && (m.role === 'fleet_manager' || m.role === 'coordinator'),
  );
}

/** Whether the person works for the hospital (buyer or clinician). */
export function worksForHospital(auth: AuthContext, hospitalId: number): boolean {
  return auth.user.memberships.some(
    (m) => m.organisationId === hospitalId && (m.role === 'buyer' || m.role === 'clinician'),
  );
}

/** Whether the person is a buyer of the hospital (who books and cancels loans). */
export function isBuyerOf(auth: AuthContext, hospitalId: number): boolean {
  return auth.user.memberships.some((m) => m.organisationId === hospitalId && m.role === 'buyer');
}

/** Hospitals the person works for (buyer or clinician). */
export function hospitalsOf(auth: AuthContext): number[] {
  return organisationsWithRole(auth, ['buyer', 'clinician']);
}

/** Lenders the person works for (fleet manager or coordinator). */
export function lendersOf(auth: AuthContext): number[] {
  return organisationsWithRole(auth, ['fleet_manager', 'coordinator']);
}
