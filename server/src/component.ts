import type { DataSource, EntitySchema, MigrationInterface } from 'typeorm';
import type { Config } from './config';
import type { ApiRouter, CatalogueEntry } from './http/routes';
import type { Logger } from './logger';

/** A migration class, as TypeORM takes it. */
export type MigrationClass = new () => MigrationInterface;

/**
 * What the app gives every component when it builds the component's routers: the process's
 * configuration, database and clock, the OpenAPI catalogue the routers add to, and the shared
 * services `app.ts` makes once (from the components' own front doors) so that two components
 * see the same cache or store.
 */
export interface ComponentContext<Services = unknown> {
  config: Config;
  dataSource: DataSource;
  logger: Logger;
  now: () => Date;
  catalogue: CatalogueEntry[];
  services: Services;
}

/** A piece of background work a process runs beside the API (a worker, a periodic job). */
export interface BackgroundJob {
  /** Logged when the job starts, e.g. `outbox worker started`. */
  name: string;
  /** Facts logged with the start line (interval, worker id, ...). */
  details: Record<string, unknown>;
  start(): void;
  /** Stops taking new work and waits for the work in hand. */
  stop(): Promise<void>;
}

/**
 * A server component's registration, exported from its `index.ts` (its front door): the
 * entities and migrations the data source collects, and the routers and background jobs the
 * app and `main.ts` collect. Everything is optional; a component lists what it has.
 */
export interface ServerComponent<Services = unknown, JobContext = unknown> {
  name: string;
  /** TypeORM entities of the tables this component owns. */
  entities?: readonly EntitySchema[];
  /** Migrations that create or change those tables (the data source orders them by time). */
  migrations?: readonly MigrationClass[];
  /** TypeORM subscribers (e.g. the outbox's after-commit nudge). */
  subscribers?: readonly (new () => object)[];
  /**
   * Routers that need the raw request body and no session or CSRF token (signed webhooks):
   * mounted before the JSON parser.
   */
  rawRouters?(ctx: ComponentContext<Services>): ApiRouter[];
  /** Routers mounted under `/api` after the session, in the order returned. */
  routers?(ctx: ComponentContext<Services>): ApiRouter[];
  /** Background jobs `main.ts` starts (none when the configuration turns them off). */
  jobs?(ctx: JobContext): BackgroundJob[];
}
