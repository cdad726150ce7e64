import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The proctor candidates' cache key reads MAX(users.updated_at) on every search; with an index
 * that is one index entry instead of a scan of every user.
 */
export class UsersUpdatedIndex1765300030000 implements MigrationInterface {
  name = 'UsersUpdatedIndex1765300030000';

  async up(q: QueryRunner): Promise<void> {
    await q.query('CREATE INDEX ix_users_updated ON users (updated_at)');
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP INDEX ix_users_updated ON users');
  }
}
