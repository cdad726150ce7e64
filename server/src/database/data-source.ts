import { DataSource, type EntitySchema, type MigrationInterface } from 'typeorm';
import type { Config } from '../config';
import { AuditEventEntity } from '../audit/data-access/entities';
import { MembershipEntity, UserEntity, UserTokenEntity } from '../identity/data-access/entities';
import { OrganisationEntity, SiteEntity } from '../organisations/data-access/entities';
import { Identity1764633600000 } from './migrations/1764633600000-identity';

/** Every entity, listed by hand because the server is bundled (no globbing at run time). */
export const entities: EntitySchema<never>[] = [
  OrganisationEntity,
  SiteEntity,
  UserEntity,
  MembershipEntity,
  UserTokenEntity,
  AuditEventEntity,
] as EntitySchema<never>[];

/** Every migration in order, listed by hand for the same reason. */
export const migrations: (new () => MigrationInterface)[] = [Identity1764633600000];

/** Tables the application owns (everything but TypeORM's `migrations`), children first. */
export const appTables = [
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
    poolSize: db.poolSize,
    extra: { connectTimeout: 5_000 },
  });
}
