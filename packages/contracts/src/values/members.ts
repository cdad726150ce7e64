/*
 * Roles and member statuses as plain values (no zod): the server matches list searches against
 * these words and the browser shows them, so both read them from here.
 */

/** Every role, in the contract's order. */
export const roles = [
  'admin',
  'buyer',
  'clinician',
  'proctor',
  'coordinator',
  'fleet_manager',
] as const;
/** A person's role in one organisation. */
export type Role = (typeof roles)[number];

/** Plain-language names for roles, shown on every screen. */
export const roleLabels: Readonly<Record<Role, string>> = {
  admin: 'Marketplace admin',
  buyer: 'Hospital buyer',
  clinician: 'Clinician',
  proctor: 'Proctor',
  coordinator: 'Logistics coordinator',
  fleet_manager: 'Fleet manager',
};

/** Where a member stands: can sign in, has not accepted yet, or was deactivated. */
export const memberStatuses = ['active', 'pending', 'deactivated'] as const;
/** A member's status. */
export type MemberStatus = (typeof memberStatuses)[number];

/** Words for each member status. */
export const memberStatusLabels: Readonly<Record<MemberStatus, string>> = {
  active: 'Active',
  pending: 'Invitation sent',
  deactivated: 'Deactivated',
};

/** Columns `GET /api/organisations/:orgId/members` sorts by. */
export const memberSortFields = ['name', 'role', 'status', 'lastSignIn'] as const;
/** A sortable column of the member list. */
export type MemberSortField = (typeof memberSortFields)[number];
