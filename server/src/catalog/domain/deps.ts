import type { DataSource } from 'typeorm';
import type { Logger } from 'pino';
import type { PhotoStore } from './photo-store';
import type { LenderSettingsCache } from './shipping-settings';

/** What the catalogue use cases need from the outside world. */
export interface CatalogDeps {
  dataSource: DataSource;
  logger: Logger;
  photoStore: PhotoStore;
  settingsCache: LenderSettingsCache;
  /** The clock (tests may pass their own). */
  now: () => Date;
}
