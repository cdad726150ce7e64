import type { DataSource } from 'typeorm';
import type { Organisation, Site } from '@evalon/contracts';
import { AppError } from '../../errors';
import type { AuthContext } from '../../identity';
import {
  findOrganisation,
  listOrganisations,
  listSites,
} from '../data-access/organisation-repository';

function ownOrganisationIds(auth: AuthContext): number[] {
  return [...new Set(auth.user.memberships.map((m) => m.organisationId))];
}

/** Every organisation for the platform admin; otherwise the person's own. */
export function organisationsVisibleTo(
  dataSource: DataSource,
  auth: AuthContext,
): Promise<Organisation[]> {
  return listOrganisations(
    dataSource.manager,
    auth.isPlatformAdmin ? undefined : ownOrganisationIds(auth),
  );
}

/** One organisation the person belongs to (any, for the platform admin); 404 otherwise. */
export async function organisationVisibleTo(
  dataSource: DataSource,
  auth: AuthContext,
  organisationId: number,
): Promise<Organisation> {
  const visible = auth.isPlatformAdmin || ownOrganisationIds(auth).includes(organisationId);
  const organisation = visible ? await findOrganisation(dataSource.manager, organisationId) : null;
  if (!organisation)
    throw AppError.notFound('organisation_not_found', 'There is no such organisation.');
  return organisation;
}

/**
 * Sites the person may see: their own organisations' sites plus every lender's depots (a
 * hospital needs depots to judge transit; a lender needs its own depots). The admin sees all.
 */
export function sitesVisibleTo(dataSource: DataSource, auth: AuthContext): Promise<Site[]> {
  return listSites(
    dataSource.manager,
    auth.isPlatformAdmin ? { all: true } : { organisationIds: ownOrganisationIds(auth) },
  );
}
