import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Organisations, sites, people, memberships, one-time tokens, the audit trail and the session
 * table. Instants are UTC DATETIME(3) written by the application (never the server clock).
 */
export class Identity1764633600000 implements MigrationInterface {
  name = 'Identity1764633600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE organisations (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        name VARCHAR(200) NOT NULL,
        kind VARCHAR(32) NOT NULL,
        country CHAR(2) NOT NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_organisations_name (name),
        CONSTRAINT ck_organisations_kind CHECK (kind IN ('hospital', 'lender', 'proctor_practice', 'platform'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE sites (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        organisation_id INT UNSIGNED NOT NULL,
        kind VARCHAR(16) NOT NULL,
        name VARCHAR(200) NOT NULL,
        address_line VARCHAR(300) NOT NULL,
        city VARCHAR(120) NOT NULL,
        postal_code VARCHAR(20) NULL,
        region VARCHAR(120) NULL,
        country CHAR(2) NOT NULL,
        latitude DECIMAL(9,6) NOT NULL,
        longitude DECIMAL(9,6) NOT NULL,
        time_zone VARCHAR(64) NOT NULL,
        receiving_hours VARCHAR(200) NULL,
        cutoff_time CHAR(5) NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        KEY ix_sites_organisation (organisation_id),
        KEY ix_sites_kind (kind),
        CONSTRAINT fk_sites_organisation FOREIGN KEY (organisation_id) REFERENCES organisations (id),
        CONSTRAINT ck_sites_kind CHECK (kind IN ('campus', 'depot')),
        CONSTRAINT ck_sites_latitude CHECK (latitude BETWEEN -90 AND 90),
        CONSTRAINT ck_sites_longitude CHECK (longitude BETWEEN -180 AND 180),
        CONSTRAINT ck_sites_cutoff CHECK (cutoff_time IS NULL OR cutoff_time REGEXP '^([01][0-9]|2[0-3]):[0-5][0-9]$')
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE users (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        email VARCHAR(254) NOT NULL,
        name VARCHAR(120) NOT NULL,
        password_hash VARCHAR(255) NULL,
        active TINYINT(1) NOT NULL DEFAULT 1,
        time_zone VARCHAR(64) NULL,
        google_subject VARCHAR(255) NULL,
        last_sign_in_at DATETIME(3) NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_users_email (email),
        UNIQUE KEY uq_users_google_subject (google_subject)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE memberships (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        user_id INT UNSIGNED NOT NULL,
        organisation_id INT UNSIGNED NOT NULL,
        role VARCHAR(32) NOT NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_memberships_user_org_role (user_id, organisation_id, role),
        KEY ix_memberships_organisation (organisation_id),
        CONSTRAINT fk_memberships_user FOREIGN KEY (user_id) REFERENCES users (id),
        CONSTRAINT fk_memberships_organisation FOREIGN KEY (organisation_id) REFERENCES organisations (id),
        CONSTRAINT ck_memberships_role CHECK (role IN ('admin', 'buyer', 'clinician', 'proctor', 'coordinator', 'fleet_manager'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE user_tokens (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        user_id INT UNSIGNED NOT NULL,
        purpose VARCHAR(32) NOT NULL,
        token_hash CHAR(64) NOT NULL,
        organisation_id INT UNSIGNED NULL,
        created_by_user_id INT UNSIGNED NULL,
        expires_at DATETIME(3) NOT NULL,
        used_at DATETIME(3) NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_user_tokens_hash (token_hash),
        KEY ix_user_tokens_user (user_id, purpose),
        CONSTRAINT fk_user_tokens_user FOREIGN KEY (user_id) REFERENCES users (id),
        CONSTRAINT fk_user_tokens_organisation FOREIGN KEY (organisation_id) REFERENCES organisations (id),
        CONSTRAINT fk_user_tokens_created_by FOREIGN KEY (created_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_user_tokens_purpose CHECK (purpose IN ('invitation', 'password_reset'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // No foreign keys on the audit trail: it must outlive whatever it mentions.
    await q.query(`
      CREATE TABLE audit_events (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        at DATETIME(3) NOT NULL,
        actor_user_id INT UNSIGNED NULL,
        organisation_id INT UNSIGNED NULL,
        action VARCHAR(64) NOT NULL,
        subject VARCHAR(200) NOT NULL,
        detail JSON NULL,
        request_id VARCHAR(64) NULL,
        PRIMARY KEY (id),
        KEY ix_audit_events_organisation (organisation_id, id),
        KEY ix_audit_events_actor (actor_user_id, id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // The layout express-mysql-session expects, plus a generated user_id (from the JSON the
    // store writes) so that deactivating someone can delete all their sessions in one statement.
    await q.query(`
      CREATE TABLE sessions (
        session_id VARCHAR(128) COLLATE utf8mb4_bin NOT NULL,
        expires INT UNSIGNED NOT NULL,
        data MEDIUMTEXT COLLATE utf8mb4_bin,
        user_id INT UNSIGNED AS (CAST(JSON_VALUE(data, '$.userId') AS UNSIGNED)) PERSISTENT,
        PRIMARY KEY (session_id),
        KEY ix_sessions_user (user_id),
        KEY ix_sessions_expires (expires)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_bin`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of [
      'sessions',
      'audit_events',
      'user_tokens',
      'memberships',
      'users',
      'sites',
      'organisations',
    ]) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
  }
}
