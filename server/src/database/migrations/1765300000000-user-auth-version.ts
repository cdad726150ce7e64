import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * `users.auth_version` counts every change to what a session knows about its person: the
 * person's e-mail, name, time zone or active flag, any of their memberships, and the name or
 * kind of an organisation they belong to. Each server process caches the signed-in person per
 * user and re-checks only this number per request (one primary-key read instead of loading the
 * person and their memberships), so the cache stays right on any number of processes.
 *
 * Triggers keep the number, not the application code: every writer (the members screens, the
 * demo data loader, a test or an operator's SQL) bumps it, and none can forget to.
 * With binary logging on (a replica), MariaDB asks for `log_bin_trust_function_creators=1` or
 * SUPER to create triggers (MariaDB documentation on binary logging of stored programs, from
 * memory); the operations notes should say so when replication is set up.
 */
export class UserAuthVersion1765300000000 implements MigrationInterface {
  name = 'UserAuthVersion1765300000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query('ALTER TABLE users ADD COLUMN auth_version INT UNSIGNED NOT NULL DEFAULT 0');
    await q.query(`
      CREATE TRIGGER tr_users_auth_version BEFORE UPDATE ON users FOR EACH ROW
        IF NOT (NEW.email <=> OLD.email) OR NOT (NEW.name <=> OLD.name)
           OR NOT (NEW.time_zone <=> OLD.time_zone) OR NOT (NEW.active <=> OLD.active) THEN
          SET NEW.auth_version = OLD.auth_version + 1;
        END IF`);
    await q.query(`
      CREATE TRIGGER tr_memberships_insert_auth_version AFTER INSERT ON memberships FOR EACH ROW
        UPDATE users SET auth_version = auth_version + 1 WHERE id = NEW.user_id`);
    await q.query(`
      CREATE TRIGGER tr_memberships_update_auth_version AFTER UPDATE ON memberships FOR EACH ROW
        UPDATE users SET auth_version = auth_version + 1 WHERE id IN (OLD.user_id, NEW.user_id)`);
    await q.query(`
      CREATE TRIGGER tr_memberships_delete_auth_version AFTER DELETE ON memberships FOR EACH ROW
        UPDATE users SET auth_version = auth_version + 1 WHERE id = OLD.user_id`);
    await q.query(`
      CREATE TRIGGER tr_organisations_auth_version AFTER UPDATE ON organisations FOR EACH ROW
        IF NOT (NEW.name <=> OLD.name) OR NOT (NEW.kind <=> OLD.kind) THEN
          UPDATE users SET auth_version = auth_version + 1
           WHERE id IN (SELECT user_id FROM memberships WHERE organisation_id = NEW.id);
        END IF`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TRIGGER IF EXISTS tr_organisations_auth_version');
    await q.query('DROP TRIGGER IF EXISTS tr_memberships_delete_auth_version');
    await q.query('DROP TRIGGER IF EXISTS tr_memberships_update_auth_version');
    await q.query('DROP TRIGGER IF EXISTS tr_memberships_insert_auth_version');
    await q.query('DROP TRIGGER IF EXISTS tr_users_auth_version');
    await q.query('ALTER TABLE users DROP COLUMN auth_version');
  }
}
