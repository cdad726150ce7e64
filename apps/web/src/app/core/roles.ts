import type { OrganisationKind, Role } from '@evalon/contracts';

/**
 * Plain-language names for roles, shown on every screen. Kept here (not taken from the zod
 * contracts at runtime) so the eagerly loaded shell does not pull the schema library in.
 */
export const roleLabels: Readonly<Record<Role, string>> = {
  admin: 'Marketplace admin',
  buyer: 'Hospital buyer',
  clinician: 'Clinician',
  proctor: 'Proctor',
  coordinator: 'Logistics coordinator',
  fleet_manager: 'Fleet manager',
};

/** Plain-language names for kinds of organisation. */
export const organisationKindLabels: Readonly<Record<OrganisationKind, string>> = {
  hospital: 'Hospital network',
  lender: 'Lender',
  proctor_practice: 'Proctor practice',
  platform: 'Marketplace operator',
};
