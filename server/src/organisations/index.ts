// The organisations component's front door: other components and the app use only what is
// exported here.
import type { AppComponent } from '../app-services';
import { organisationRoutes, siteRoutes } from './api/routes';
import { OrganisationEntity, SiteEntity } from './data-access/entities';

export {
  findOrganisation,
  insertOrganisation,
  insertSite,
} from './data-access/organisation-repository';
export { SiteEntity } from './data-access/entities';
export {
  findDepot,
  findOrganisationKind,
  findSiteWithOrganisation,
  insertDepot,
  listDepots,
  updateDepot,
  type SiteWithOrganisation,
} from './data-access/depot-repository';

/** Organisations and their sites (tables created by the identity migration). */
export const organisationsComponent: AppComponent = {
  name: 'organisations',
  entities: [OrganisationEntity, SiteEntity],
  routers: (ctx) => [
    organisationRoutes(ctx.dataSource, ctx.catalogue),
    siteRoutes(ctx.dataSource, ctx.catalogue),
  ],
};
