// The catalog component's front door: other components and the app use only what is exported
// here.
import type { AppComponent } from '../app-services';
import { Catalog1764720000000 } from '../database/migrations/1764720000000-catalog';
import { lenderRoutes, modelRoutes, unitRoutes } from './api/routes';
import {
  CompatibilityEntity,
  LenderSettingsEntity,
  ModelEntity,
  PackingItemEntity,
  PhotoEntity,
  UnitEntity,
} from './data-access/entities';
import type { CatalogDeps } from './domain/deps';

export { findSiteWithOrganisation, type SiteWithOrganisation } from '../organisations';
export { insertModel, replacePackingList } from './data-access/model-repository';
export { insertUnit, lockUnits } from './data-access/unit-repository';
export {
  deleteLoanHolds,
  findHoldsForUnits,
  insertHolds,
  type HoldInterval,
  type NewHold,
} from './data-access/hold-repository';
export { bumpBookingVersion } from './data-access/unit-repository';
export type { CatalogDeps } from './domain/deps';
export { unitDeposit } from './domain/models';
export { LocalPhotoStore, type PhotoStore } from './domain/photo-store';
export {
  hospitalsOf,
  isBuyerOf,
  isFleetManagerOf,
  lendersOf,
  organisationsWithRole,
  worksForHospital,
  worksForLender,
} from './domain/scope';
export { LenderSettingsCache, toSchedulingSettings } from './domain/shipping-settings';
export { addMaintenanceHold } from './domain/units';

/** Models, units, photos, lender settings and depots: their tables and routes. */
export const catalogComponent: AppComponent = {
  name: 'catalog',
  entities: [
    LenderSettingsEntity,
    ModelEntity,
    PackingItemEntity,
    CompatibilityEntity,
    PhotoEntity,
    UnitEntity,
  ],
  migrations: [Catalog1764720000000],
  routers: (ctx) => {
    const deps: CatalogDeps = {
      dataSource: ctx.dataSource,
      logger: ctx.logger,
      photoStore: ctx.services.photoStore,
      settingsCache: ctx.services.settingsCache,
      now: ctx.now,
    };
    return [
      lenderRoutes(deps, ctx.catalogue),
      ...modelRoutes(deps, ctx.catalogue),
      unitRoutes(deps, ctx.catalogue),
    ];
  },
};
