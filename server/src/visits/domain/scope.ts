import type { Role } from '@evalon/contracts';
import type { AuthContext } from '../../identity';

/** Whether the person holds one of the roles in the organisation. */
export function holds(auth: AuthContext, organisationId: number, roles: readonly Role[]): boolean {
  return auth.user.memberships.some(
    (m) => m.organisationId === organisationId && roles.includes(m.role),
  );
}

/** Hospital people who ask for and follow visits: buyers and clinicians. */
export const requesterRoles: readonly Role[] = ['buyer', 'clinician'];

/** Whether the person may ask for, follow and cancel the hospital's visits. */
export function isRequesterOf(auth: AuthContext, hospitalId: number): boolean {
  return holds(auth, hospitalId, requesterRoles);
}

/** Whether the person is a proctor (of any practice). */
export function isProctor(auth: AuthContext): boolean {
  return auth.user.memberships.some((m) => m.role === 'proctor');
}
