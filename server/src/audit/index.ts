// The audit component's front door: other components and the app use only what is exported here.
import type { AppComponent } from '../app-services';
import { auditRoutes } from './api/routes';
import { AuditEventEntity } from './data-access/entities';

export { insertAuditEvent } from './domain/audit';

/** The audit trail: its table (created by the identity migration) and `/api/audit`. */
export const auditComponent: AppComponent = {
  name: 'audit',
  entities: [AuditEventEntity],
  routers: (ctx) => [auditRoutes(ctx.dataSource, ctx.catalogue)],
};
