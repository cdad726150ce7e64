import type { DataSource } from 'typeorm';
import type { Logger } from 'pino';

/** What the identity use cases need from the outside world. */
export interface IdentityDeps {
  dataSource: DataSource;
  logger: Logger;
  /** Base of links in e-mails, e.g. `http://127.0.0.1:8080`. */
  publicUrl: string;
  /** The clock (tests may pass their own). */
  now: () => Date;
}

/** Facts about the HTTP request that the audit trail keeps. */
export interface RequestContext {
  requestId: string | null;
}
