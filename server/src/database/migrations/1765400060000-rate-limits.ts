import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * `rate_limits`: the sign-in failure counters, shared by every server process. The table is
 * the one rate-limiter-flexible's MySQL store reads and writes (its own layout: `key`, `points`,
 * `expire` in epoch milliseconds); it is made here so the schema comes from migrations only, and
 * the store is told not to create it (`tableCreated: true`).
 */
export class RateLimits1765400060000 implements MigrationInterface {
  name = 'RateLimits1765400060000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE rate_limits (
        \`key\` VARCHAR(255) NOT NULL,
        points INT NOT NULL DEFAULT 0,
        expire BIGINT UNSIGNED NULL,
        PRIMARY KEY (\`key\`)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE rate_limits');
  }
}
