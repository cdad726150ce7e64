import type { OrganisationKind, Role } from '@evalon/contracts';

/*
 * Rules from `@evalon/contracts`, restated as plain values for the browser. The contracts are
 * zod schemas, and importing them at runtime adds the whole schema library (about 440 kB before
 * compression) to every page that validates a form. `contract-rules.spec.ts` checks each value
 * here against the contract itself, so a change there fails the client tests until it is copied.
 */

/** Every role, in the contract's order. */
export const allRoles: readonly Role[] = [
  'admin',
  'buyer',
  'clinician',
  'proctor',
  'coordinator',
  'fleet_manager',
];

/** Roles that make sense in each kind of organisation (contract: `rolesByKind`). */
export const rolesByKind: Readonly<Record<OrganisationKind, readonly Role[]>> = {
  hospital: ['buyer', 'clinician'],
  lender: ['fleet_manager', 'coordinator'],
  proctor_practice: ['proctor'],
  platform: ['admin'],
};

/** Roles that look after their organisation's members (contract: `memberManagingRoles`). */
export const memberManagingRoles: readonly Role[] = ['admin', 'buyer', 'fleet_manager'];

/** Who may invite whom, by the inviter's role there (contract: `invitableRolesByRole`). */
export const invitableRolesByRole: Readonly<Partial<Record<Role, readonly Role[]>>> = {
  buyer: ['buyer', 'clinician'],
  fleet_manager: ['fleet_manager', 'coordinator'],
};

/**
 * Roles a person may hand out in an organisation of `kind`, given the roles they hold there
 * (contract: `invitableRoles`; the spec compares the two on every combination).
 */
export function invitableRoles(
  kind: OrganisationKind,
  rolesHeldThere: readonly Role[],
  isPlatformAdmin: boolean,
): Role[] {
  const fitting = rolesByKind[kind];
  if (isPlatformAdmin) return [...fitting];
  const allowed = new Set(rolesHeldThere.flatMap((held) => invitableRolesByRole[held] ?? []));
  return fitting.filter((role) => allowed.has(role));
}

/** Password length limits and their messages (contract: `password`). */
export const passwordRule = {
  minLength: 10,
  maxLength: 200,
  tooShort: 'Use at least 10 characters.',
  tooLong: 'Use at most 200 characters.',
} as const;

/** Longest name a person may have (contract: `inviteRequest.name`, `setPasswordRequest.name`). */
export const nameMaxLength = 120;

/** Longest e-mail address (contract: `email`, RFC 5321's 254-character path limit). */
export const emailMaxLength = 254;
