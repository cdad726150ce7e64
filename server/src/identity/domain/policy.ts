import {
  invitableRoles,
  memberManagingRoles,
  rolesByKind,
  type OrganisationKind,
  type Role,
} from '@evalon/contracts';
import { rolesIn, type AuthContext } from './auth-context';

/**
 * Member-management rules, pure so they can be tested without a database.
 *
 * Matrix (who may hand out or take away which role, inside one organisation):
 * | actor                      | may invite / change to / deactivate |
 * | -------------------------- | ----------------------------------- |
 * | platform admin             | every role fitting the org's kind   |
 * | buyer (hospital)           | buyer, clinician                    |
 * | fleet_manager (lender)     | fleet_manager, coordinator          |
 * | everyone else              | nobody                              |
 * The matrix itself lives in `@evalon/contracts` so the client shows the same choices.
 */

/** Whether the role is one of those that look after members, for an organisation's kind. */
export function isManagingRole(role: Role, kind: OrganisationKind): boolean {
  return memberManagingRoles.includes(role) && rolesByKind[kind].includes(role);
}

/** Whether the person may manage members of the organisation (admin anywhere, or a managing role there). */
export function managesOrganisation(auth: AuthContext, organisationId: number): boolean {
  if (auth.isPlatformAdmin) return true;
  return rolesIn(auth, organisationId).some((r) => memberManagingRoles.includes(r));
}

/** Roles the person may assign in an organisation of `kind`. */
export function assignableRoles(
  auth: AuthContext,
  organisationId: number,
  kind: OrganisationKind,
): Role[] {
  return invitableRoles(kind, rolesIn(auth, organisationId), auth.isPlatformAdmin);
}

/** Whether the role fits the organisation's kind (a clinician in a lender does not). */
export function roleFitsKind(role: Role, kind: OrganisationKind): boolean {
  return rolesByKind[kind].includes(role);
}

/** One membership as the last-manager rule needs to see it. */
export interface ManagingCandidate {
  membershipId: number;
  userId: number;
  role: Role;
  /** Whether the person can still sign in. */
  active: boolean;
}

/**
 * Whether the organisation still has someone to look after it once `change` is applied:
 * at least one active person with a managing role. Organisations that never had such a person
 * (e.g. a proctor practice, managed by the platform admin) are left alone.
 */
export function keepsAManager(
  kind: OrganisationKind,
  members: readonly ManagingCandidate[],
  change: { membershipId: number; role?: Role; deactivateUserId?: number },
): boolean {
  const isManager = (m: ManagingCandidate) => m.active && isManagingRole(m.role, kind);
  if (!members.some(isManager)) return true;
  const after = members.map((m) => ({
    ...m,
    role: m.membershipId === change.membershipId && change.role ? change.role : m.role,
    active: change.deactivateUserId === m.userId ? false : m.active,
  }));
  return after.some(isManager);
}
