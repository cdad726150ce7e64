import { DataSource, type EntitySchema, type MigrationInterface } from 'typeorm';
import type { Config } from '../config';
import { AuditEventEntity } from '../audit/data-access/entities';
import { MembershipEntity, UserEntity, UserTokenEntity } from '../identity/data-access/entities';
import { NotificationEntity, OutboxMessageEntity } from '../notifications/data-access/entities';
import { OutboxCommitSubscriber } from '../notifications/outbox';
import { OrganisationEntity, SiteEntity } from '../organisations/data-access/entities';
import { Identity1764633600000 } from './migrations/1764633600000-identity';
import { OutboxNotifications1764806400000 } from './migrations/1764806400000-outbox-notifications';
import {
  CompatibilityEntity,
  LenderSettingsEntity,
  ModelEntity,
  PackingItemEntity,
  PhotoEntity,
  UnitEntity,
} from '../catalog/data-access/entities';
import {
  HoldEntity,
  LoanEntity,
  LoanEventEntity,
  LoanUnitEntity,
} from '../loans/data-access/entities';
import { Catalog1764720000000 } from './migrations/1764720000000-catalog';
import { Loans1764720060000 } from './migrations/1764720060000-loans';
import { HoldsHospital1764979200000 } from './migrations/1764979200000-holds-hospital';
import { Payments1764892800000 } from './migrations/1764892800000-payments';
import { Shipments1765152000000, shipmentEntities, shipmentTables } from '../shipments';

/** Every entity, listed by hand because the server is bundled (no globbing at run time). */
export const entities: EntitySchema<never>[] = [
  OrganisationEntity,
  SiteEntity,
  UserEntity,
  MembershipEntity,
  UserTokenEntity,
  AuditEventEntity,
  OutboxMessageEntity,
  NotificationEntity,
  LenderSettingsEntity,
  ModelEntity,
  PackingItemEntity,
  CompatibilityEntity,
  PhotoEntity,
  UnitEntity,
  LoanEntity,
  LoanUnitEntity,
  HoldEntity,
  LoanEventEntity,
  ...shipmentEntities,
] as EntitySchema<never>[];

/** Every migration in order, listed by hand for the same reason. */
export const migrations: (new () => MigrationInterface)[] = [
  Identity1764633600000,
  Catalog1764720000000,
  Loans1764720060000,
  OutboxNotifications1764806400000,
  Payments1764892800000,
  HoldsHospital1764979200000,
  Shipments1765152000000,
];

/** Tables the application owns (everything but TypeORM's `migrations`), children first. */
export const appTables = [
  ...shipmentTables,
  'loan_documents',
  'refunds',
  'payment_events',
  'payments',
  'credit_agreements',
  'notifications',
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
    // Wakes this process's outbox workers when a transaction that enqueued e-mail commits.
    subscribers: [OutboxCommitSubscriber],
    poolSize: db.poolSize,
    extra: { connectTimeout: 5_000 },
  });
}
