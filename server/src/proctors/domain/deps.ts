import type { DataSource } from 'typeorm';
import type { PhotoStore } from '../../catalog/domain/photo-store';
import type { Logger } from '../../logger';

/** What the proctors component needs. */
export interface ProctorDeps {
  dataSource: DataSource;
  logger: Logger;
  /** Where credential PDFs live (a local folder by default). */
  credentialStore: PhotoStore;
  now: () => Date;
}
