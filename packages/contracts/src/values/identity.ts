/*
 * Organisation kinds and who may hand out which role, without zod, for the browser and the
 * schemas alike.
 */

import type { Role } from './members';

/** Kinds of organisation on the marketplace (`platform` is the operator's own). */
export const organisationKinds = ['hospital', 'lender', 'proctor_practice', 'platform'] as const;
/** One of `organisationKinds`. */
export type OrganisationKind = (typeof organisationKinds)[number];

/** Roles that make sense in each kind of organisation. */
export const rolesByKind: Record<OrganisationKind, readonly Role[]> = {
  hospital: ['buyer', 'clinician'],
  lender: ['fleet_manager', 'coordinator'],
  proctor_practice: ['proctor'],
  platform: ['admin'],
};

/**
 * Who may invite whom, by the inviter's role inside the same organisation. A platform `admin`
 * may invite any role that fits the organisation's kind (see {@link rolesByKind}) anywhere.
 * Proctor practices are usually one person, so only an admin adds people there.
 */
export const invitableRolesByRole: Readonly<Partial<Record<Role, readonly Role[]>>> = {
  buyer: ['buyer', 'clinician'],
  fleet_manager: ['fleet_manager', 'coordinator'],
};

/** Roles that look after their organisation's members (invite, change role, deactivate). */
export const memberManagingRoles: readonly Role[] = ['admin', 'buyer', 'fleet_manager'];

/**
 * Roles a person may hand out in an organisation of `kind`, given the roles they hold there
 * (`isPlatformAdmin` when they are an `admin` of the platform). Empty when they may not invite.
 */
export function invitableRoles(
  kind: OrganisationKind,
  rolesHeldThere: readonly Role[],
  isPlatformAdmin: boolean,
): Role[] {
  const fitting = rolesByKind[kind];
  if (isPlatformAdmin) return [...fitting];
  const allowed = new Set<Role>();
  for (const held of rolesHeldThere) {
    for (const r of invitableRolesByRole[held] ?? []) if (fitting.includes(r)) allowed.add(r);
  }
  return fitting.filter((r) => allowed.has(r));
}

/** Password length limits and their messages. */
export const passwordRule = {
  minLength: 10,
  maxLength: 200,
  tooShort: 'Use at least 10 characters.',
  tooLong: 'Use at most 200 characters.',
} as const;

/** Longest name a person may have. */
export const nameMaxLength = 120;

/** Longest e-mail address (RFC 5321's 254-character path limit). */
export const emailMaxLength = 254;
