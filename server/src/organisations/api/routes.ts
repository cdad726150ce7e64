import type { DataSource } from 'typeorm';
import { organisationList, siteList } from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { organisationsVisibleTo, sitesVisibleTo } from '../domain/organisations';

/** `GET /api/organisations`. Mounted at the same base as the member routes. */
export function organisationRoutes(dataSource: DataSource, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/organisations', 'Organisations', catalogue);
  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Organisations you belong to (all of them for the platform admin)',
      access: { authenticated: true },
      responses: { 200: { description: 'By name.', schema: organisationList } },
    },
    async ({ req, res }) => {
      res.json({ items: await organisationsVisibleTo(dataSource, currentAuth(req)) });
    },
  );
  return api;
}

/** `GET /api/sites`. */
export function siteRoutes(dataSource: DataSource, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/sites', 'Organisations', catalogue);
  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'Your organisations’ sites plus every lender’s depots (all sites for the admin)',
      access: { authenticated: true },
      responses: { 200: { description: 'By organisation, then name.', schema: siteList } },
    },
    async ({ req, res }) => {
      res.json({ items: await sitesVisibleTo(dataSource, currentAuth(req)) });
    },
  );
  return api;
}
