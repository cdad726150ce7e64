import type { OrganisationKind } from '@evalon/contracts';

/**
 * Plain-language names for roles, shown on every screen: from the contracts' zod-free values, so
 * the eagerly loaded shell does not pull the schema library in.
 */
export { roleLabels } from '@evalon/contracts/values';

/** Plain-language names for kinds of organisation. */
export const organisationKindLabels: Readonly<Record<OrganisationKind, string>> = {
  hospital: 'Hospital network',
  lender: 'Lender',
  proctor_practice: 'Proctor practice',
  platform: 'Marketplace operator',
};
