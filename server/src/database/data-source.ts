import { DataSource, type EntitySchema } from 'typeorm';
import type { MigrationClass } from '../component';
import { serverComponents } from '../components';
import type { Config } from '../config';

/**
 * Every entity, collected from the components' front doors (listed, not globbed: the server is
 * bundled, so there are no entity files to find at run time).
 */
export const entities: EntitySchema[] = serverComponents.flatMap((c) => [...(c.entities ?? [])]);

/** The timestamp TypeORM reads from a migration's name (its last 13 digits). */
function timestampOf(m: MigrationClass): number {
  const name = new m().name ?? m.name;
  const match = /(\d{13})$/.exec(name);
  if (!match) throw new Error(`migration ${name} does not end in a 13-digit timestamp`);
  return Number(match[1]);
}

/** Every migration, collected from the components' front doors, oldest first. */
export const migrations: MigrationClass[] = serverComponents
  .flatMap((c) => [...(c.migrations ?? [])])
  .sort((x, y) => timestampOf(x) - timestampOf(y));

const subscribers = serverComponents.flatMap((c) => [...(c.subscribers ?? [])]);

/**
 * Tables the application owns, children first: everything but TypeORM's `migrations` and
 * `typeorm_metadata` (which the demo data loader must not empty).
 */
export const appTables = [
  'evaluation_sharing',
  'evaluation_decisions',
  'evaluation_feedback',
  'evaluation_cases',
  'loan_settlements',
  'shipment_photos',
  'inspection_findings',
  'shipment_alerts',
  'shipment_events',
  'shipment_scans',
  'shipment_items',
  'shipments',
  'shipment_settings',
  'visit_model_settings',
  'visit_sign_offs',
  'visit_cases',
  'visit_events',
  'visit_offers',
  'visits',
  'proctor_credentials',
  'proctor_experience',
  'proctor_profiles',
  'loan_documents',
  'refunds',
  'payment_events',
  'payments',
  'credit_agreements',
  'notifications',
  'notice_jobs',
  'outbox_messages',
  'loan_events',
  'holds',
  'loan_units',
  'loans',
  'model_photos',
  'units',
  'model_compatibility',
  'model_packing_items',
  'models',
  'lender_settings',
  'sessions',
  'rate_limits',
  'audit_events',
  'user_tokens',
  'memberships',
  'users',
  'sites',
  'organisations',
] as const;

/**
 * A TypeORM data source for MariaDB. `synchronize` stays off: the schema changes only through
 * migrations. Instants travel as UTC (`timezone: 'Z'`).
 */
export function createDataSource(db: Config['db']): DataSource {
  return new DataSource({
    type: 'mariadb',
    host: db.host,
    port: db.port,
    username: db.user,
    password: db.password,
    database: db.database,
    charset: 'utf8mb4_unicode_ci',
    timezone: 'Z',
    synchronize: false,
    migrationsRun: false,
    logging: false,
    entities,
    migrations,
    // E.g. the outbox's: wakes this process's workers when a transaction that enqueued e-mail
    // commits.
    subscribers,
    poolSize: db.poolSize,
    extra: { connectTimeout: 5_000 },
  });
}
