import type { DataSource } from 'typeorm';
import { auditList, auditQuery, errorBody, memberManagingRoles } from '@evalon/contracts';
import { currentAuth } from '../../http/access';
import { ApiRouter, type CatalogueEntry } from '../../http/routes';
import { listAuditEvents } from '../domain/audit';

/** `GET /api/audit`. */
export function auditRoutes(dataSource: DataSource, catalogue: CatalogueEntry[]): ApiRouter {
  const api = new ApiRouter('/api/audit', 'Audit', catalogue);
  api.route(
    {
      method: 'get',
      path: '/',
      summary: 'The audit trail, newest first',
      description:
        'Managing members give their organisationId; the platform admin may leave it out to see everything.',
      access: { roles: memberManagingRoles, org: 'query:organisationId' },
      query: auditQuery,
      responses: {
        200: { description: 'Events.', schema: auditList },
        403: { description: 'Not a manager of that organisation.', schema: errorBody },
      },
    },
    async ({ req, res, query }) => {
      res.json({ items: await listAuditEvents(dataSource, currentAuth(req), query) });
    },
  );
  return api;
}
