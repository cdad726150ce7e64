import type { DataSource } from 'typeorm';
import type { FileStore } from '../../storage/file-store';
import type { Logger } from '../../logger';

/** What the proctors component needs. */
export interface ProctorDeps {
  dataSource: DataSource;
  logger: Logger;
  /** Where credential PDFs live (a local folder by default). */
  credentialStore: FileStore;
  now: () => Date;
}
