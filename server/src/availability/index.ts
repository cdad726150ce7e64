// The availability component's front door: other components and the app use only what is
// exported here.
import type { AppComponent } from '../app-services';
import { availabilityRoutes } from './api/routes';
import type { AvailabilityDeps } from './domain/availability';

export { findCandidates, type CandidateUnit } from './data-access/availability-repository';
export {
  alternativesFor,
  checkUseWindow,
  evaluateForWindow,
  holdsByUnit,
  resolveCampus,
  type AvailabilityDeps,
  type Campus,
} from './domain/availability';
export { PlannerCache } from './domain/planner-cache';
export { SiteCache } from './domain/site-cache';

/** The availability engine's dependencies in an app (shared caches from the app's services). */
export function availabilityDepsOf(
  ctx: Parameters<NonNullable<AppComponent['routers']>>[0],
): AvailabilityDeps {
  return {
    dataSource: ctx.dataSource,
    logger: ctx.logger,
    settingsCache: ctx.services.settingsCache,
    plans: ctx.services.plans,
    sites: ctx.services.sites,
    now: ctx.now,
  };
}

/** Availability search: `/api/availability` (no tables of its own; it reads holds and units). */
export const availabilityComponent: AppComponent = {
  name: 'availability',
  routers: (ctx) => [availabilityRoutes(availabilityDepsOf(ctx), ctx.catalogue)],
};
