import type { AppComponent } from './app-services';
import { auditComponent } from './audit';
import { availabilityComponent } from './availability';
import { catalogComponent } from './catalog';
import { evidenceComponent } from './evidence';
import { identityComponent } from './identity';
import { loansComponent } from './loans';
import { mapsComponent } from './maps';
import { notificationsComponent } from './notifications';
import { organisationsComponent } from './organisations';
import { paymentsComponent } from './payments';
import { proctorsComponent } from './proctors';
import { shipmentsComponent } from './shipments';
import { systemComponent } from './system';
import { visitsComponent } from './visits';

/**
 * Every server component, as its front door registers it. The data source collects their
 * entities and migrations, `createApp` their routers (mounted in this order: a component whose
 * routes share a base path with another's comes after it), `main.ts` their background jobs.
 * A new component adds one line here.
 */
export const serverComponents: readonly AppComponent[] = [
  systemComponent,
  organisationsComponent,
  identityComponent,
  auditComponent,
  notificationsComponent,
  catalogComponent,
  availabilityComponent,
  loansComponent,
  mapsComponent,
  paymentsComponent,
  proctorsComponent,
  visitsComponent,
  shipmentsComponent,
  evidenceComponent,
];
