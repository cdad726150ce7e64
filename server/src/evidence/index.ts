// The evidence component's front door: other components and the app use only what is exported
// here. Case records, metrics, clinician surveys and the buyer's decision of an evaluation loan.
import type { AppComponent } from '../app-services';
import { Evidence1765324860000 } from '../database/migrations/1765324860000-evidence';
import { EvidenceSharing1765411200000 } from '../database/migrations/1765411200000-evidence-sharing';
import { evidenceRoutes } from './api/routes';
import { evidenceEntities } from './data-access/entities';

export type { EvidenceDeps } from './domain/deps';

/** Evaluation evidence: its tables and `/api/loans/:id/{cases,metrics,feedback,decision}`. */
export const evidenceComponent: AppComponent = {
  name: 'evidence',
  entities: evidenceEntities,
  migrations: [Evidence1765324860000, EvidenceSharing1765411200000],
  routers: (ctx) => [evidenceRoutes({ dataSource: ctx.dataSource, now: ctx.now }, ctx.catalogue)],
};
