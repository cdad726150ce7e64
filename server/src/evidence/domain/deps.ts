import type { DataSource } from 'typeorm';

/** What the evidence use cases need. */
export interface EvidenceDeps {
  dataSource: DataSource;
  now: () => Date;
}
