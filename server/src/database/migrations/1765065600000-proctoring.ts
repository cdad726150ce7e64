import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * `visit_offers.live_visit_id`: the visit while the offer is live, NULL otherwise. Written once
 * here for the column and for TypeORM's record of it (the entity declares the same text).
 */
const LIVE_OFFER_EXPRESSION = "IF(state = 'offered', visit_id, NULL)";

/**
 * Proctoring visits: proctor profiles with experience per model, credentials (with a PDF),
 * availability (RFC 5545 recurrences in the proctor's zone), visits with their offers (one
 * proctor at a time), event trail, supervised case records and sign-offs. Sites get an ISO
 * 3166-2 subdivision so a visit knows its jurisdiction.
 */
export class Proctoring1765065600000 implements MigrationInterface {
  name = 'Proctoring1765065600000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`ALTER TABLE sites ADD COLUMN subdivision VARCHAR(6) NULL AFTER country`);
    // Settings: the model's minimum supervised cases of a proctor (per lender; a product
    // assumption, default 20) and the proctored cases before a sign-off (per hospital; default 3,
    // near the 3.24 mean of a survey of 42 US hospital policies).
    await q.query(
      'ALTER TABLE lender_settings ADD COLUMN min_supervised_cases SMALLINT UNSIGNED NOT NULL DEFAULT 20',
    );
    await q.query(
      'ALTER TABLE organisations ADD COLUMN sign_off_threshold TINYINT UNSIGNED NOT NULL DEFAULT 3',
    );

    await q.query(`
      CREATE TABLE proctor_profiles (
        user_id INT UNSIGNED NOT NULL,
        organisation_id INT UNSIGNED NOT NULL,
        display_name VARCHAR(120) NOT NULL,
        home_latitude DECIMAL(9,6) NOT NULL,
        home_longitude DECIMAL(9,6) NOT NULL,
        home_time_zone VARCHAR(64) NOT NULL,
        home_country CHAR(2) NOT NULL,
        travel_radius_km INT UNSIGNED NOT NULL,
        languages JSON NOT NULL,
        day_rate BIGINT UNSIGNED NOT NULL,
        travel_day_rate BIGINT UNSIGNED NOT NULL,
        currency CHAR(3) NOT NULL,
        specialties JSON NOT NULL,
        bio TEXT NULL,
        availability JSON NOT NULL,
        last_offered_at DATETIME(3) NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (user_id),
        KEY ix_proctor_profiles_org (organisation_id),
        KEY ix_proctor_profiles_updated (updated_at),
        CONSTRAINT fk_proctor_profiles_user FOREIGN KEY (user_id) REFERENCES users (id),
        CONSTRAINT fk_proctor_profiles_org FOREIGN KEY (organisation_id) REFERENCES organisations (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // Supervised cases per model: what the proctor declared plus what completed visits added.
    await q.query(`
      CREATE TABLE proctor_experience (
        proctor_user_id INT UNSIGNED NOT NULL,
        model_id INT UNSIGNED NOT NULL,
        declared_cases INT UNSIGNED NOT NULL DEFAULT 0,
        recorded_cases INT UNSIGNED NOT NULL DEFAULT 0,
        PRIMARY KEY (proctor_user_id, model_id),
        KEY ix_proctor_experience_model (model_id),
        CONSTRAINT fk_proctor_experience_proctor FOREIGN KEY (proctor_user_id) REFERENCES proctor_profiles (user_id),
        CONSTRAINT fk_proctor_experience_model FOREIGN KEY (model_id) REFERENCES models (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE proctor_credentials (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        proctor_user_id INT UNSIGNED NOT NULL,
        kind VARCHAR(16) NOT NULL,
        title VARCHAR(200) NOT NULL,
        jurisdiction VARCHAR(6) NOT NULL,
        valid_from DATE NOT NULL,
        valid_to DATE NOT NULL,
        storage_key VARCHAR(64) NULL,
        file_name VARCHAR(200) NULL,
        size_bytes INT UNSIGNED NULL,
        sha256 CHAR(64) NULL,
        expiry_warned_at DATETIME(3) NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_proctor_credentials_storage_key (storage_key),
        KEY ix_proctor_credentials_proctor (proctor_user_id, valid_to),
        KEY ix_proctor_credentials_valid_to (valid_to),
        CONSTRAINT fk_proctor_credentials_proctor FOREIGN KEY (proctor_user_id) REFERENCES proctor_profiles (user_id),
        CONSTRAINT ck_proctor_credentials_kind CHECK (kind IN ('licence', 'privileges', 'certificate')),
        CONSTRAINT ck_proctor_credentials_window CHECK (valid_to >= valid_from)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query('CREATE SEQUENCE visit_reference_seq START WITH 1 INCREMENT BY 1');
    // busy_from/busy_to: the visit days plus travel days of the accepted proctor (campus calendar),
    // the interval no other accepted visit of that proctor may overlap.
    await q.query(`
      CREATE TABLE visits (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        reference VARCHAR(24) NOT NULL,
        kind VARCHAR(16) NOT NULL,
        state VARCHAR(16) NOT NULL,
        hospital_id INT UNSIGNED NOT NULL,
        site_id INT UNSIGNED NOT NULL,
        site_time_zone VARCHAR(64) NOT NULL,
        jurisdiction VARCHAR(6) NOT NULL,
        model_id INT UNSIGNED NOT NULL,
        loan_id INT UNSIGNED NULL,
        visit_from DATE NOT NULL,
        visit_to DATE NOT NULL,
        cases INT UNSIGNED NOT NULL,
        language VARCHAR(35) NULL,
        note TEXT NULL,
        requested_by_user_id INT UNSIGNED NOT NULL,
        proctor_user_id INT UNSIGNED NULL,
        busy_from DATE NULL,
        busy_to DATE NULL,
        travel_days TINYINT UNSIGNED NULL,
        fee_amount BIGINT UNSIGNED NULL,
        fee_currency CHAR(3) NULL,
        invite_sequence INT UNSIGNED NOT NULL DEFAULT 0,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_visits_reference (reference),
        KEY ix_visits_hospital_state (hospital_id, state),
        KEY ix_visits_proctor_busy (proctor_user_id, state, busy_from, busy_to),
        KEY ix_visits_loan (loan_id),
        KEY ix_visits_updated (updated_at),
        CONSTRAINT fk_visits_hospital FOREIGN KEY (hospital_id) REFERENCES organisations (id),
        CONSTRAINT fk_visits_site FOREIGN KEY (site_id) REFERENCES sites (id),
        CONSTRAINT fk_visits_model FOREIGN KEY (model_id) REFERENCES models (id),
        CONSTRAINT fk_visits_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_visits_requested_by FOREIGN KEY (requested_by_user_id) REFERENCES users (id),
        CONSTRAINT fk_visits_proctor FOREIGN KEY (proctor_user_id) REFERENCES proctor_profiles (user_id),
        CONSTRAINT ck_visits_state CHECK (state IN ('requested', 'offered', 'accepted', 'completed', 'signed_off', 'cancelled', 'unfilled')),
        CONSTRAINT ck_visits_kind CHECK (kind IN ('proctoring', 'in_service', 'demonstration')),
        CONSTRAINT ck_visits_window CHECK (visit_to >= visit_from AND cases >= 1)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // The candidate list in order; at most one row per visit is 'offered' at a time (the generated
    // column is NULL otherwise, and a unique key ignores NULLs): the second guard behind the lock.
    await q.query(`
      CREATE TABLE visit_offers (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        visit_id INT UNSIGNED NOT NULL,
        proctor_user_id INT UNSIGNED NOT NULL,
        position SMALLINT UNSIGNED NOT NULL,
        state VARCHAR(16) NOT NULL,
        score DECIMAL(5,1) NULL,
        offered_at DATETIME(3) NULL,
        deadline_at DATETIME(3) NULL,
        answered_at DATETIME(3) NULL,
        reason TEXT NULL,
        live_visit_id INT UNSIGNED AS (${LIVE_OFFER_EXPRESSION}) PERSISTENT,
        PRIMARY KEY (id),
        UNIQUE KEY uq_visit_offers_proctor (visit_id, proctor_user_id),
        UNIQUE KEY uq_visit_offers_live (live_visit_id),
        KEY ix_visit_offers_deadline (state, deadline_at),
        KEY ix_visit_offers_proctor_state (proctor_user_id, state),
        KEY ix_visit_offers_proctor_offered (proctor_user_id, offered_at),
        KEY ix_visit_offers_offered (offered_at),
        CONSTRAINT fk_visit_offers_visit FOREIGN KEY (visit_id) REFERENCES visits (id),
        CONSTRAINT fk_visit_offers_proctor FOREIGN KEY (proctor_user_id) REFERENCES proctor_profiles (user_id),
        CONSTRAINT ck_visit_offers_state CHECK (state IN ('queued', 'offered', 'accepted', 'declined', 'expired', 'withdrawn', 'skipped'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // TypeORM's own table, in the shape its schema builder gives it: it reads a generated column's
    // expression from here, not from information_schema (which MariaDB reformats), one row per
    // column keyed by database (schema), table and name. IF NOT EXISTS: TypeORM's migration runner
    // already makes it before running migrations when an entity has a generated column.
    await q.query(`
      CREATE TABLE IF NOT EXISTS typeorm_metadata (
        \`type\` VARCHAR(255) NOT NULL,
        \`database\` VARCHAR(255) NULL,
        \`schema\` VARCHAR(255) NULL,
        \`table\` VARCHAR(255) NULL,
        \`name\` VARCHAR(255) NULL,
        \`value\` TEXT NULL
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(
      `INSERT INTO typeorm_metadata (\`type\`, \`database\`, \`schema\`, \`table\`, \`name\`, \`value\`)
       VALUES ('GENERATED_COLUMN', NULL, DATABASE(), 'visit_offers', 'live_visit_id', ?)`,
      [LIVE_OFFER_EXPRESSION],
    );

    await q.query(`
      CREATE TABLE visit_events (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        visit_id INT UNSIGNED NOT NULL,
        at DATETIME(3) NOT NULL,
        actor_user_id INT UNSIGNED NULL,
        kind VARCHAR(24) NOT NULL,
        from_state VARCHAR(16) NULL,
        to_state VARCHAR(16) NOT NULL,
        proctor_user_id INT UNSIGNED NULL,
        reason TEXT NULL,
        PRIMARY KEY (id),
        KEY ix_visit_events_visit (visit_id, id),
        CONSTRAINT fk_visit_events_visit FOREIGN KEY (visit_id) REFERENCES visits (id),
        CONSTRAINT fk_visit_events_actor FOREIGN KEY (actor_user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE visit_cases (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        visit_id INT UNSIGNED NOT NULL,
        case_number SMALLINT UNSIGNED NOT NULL,
        trainee_user_id INT UNSIGNED NOT NULL,
        trainee_role VARCHAR(24) NOT NULL,
        ratings JSON NOT NULL,
        notes TEXT NULL,
        recorded_by_user_id INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_visit_cases_number (visit_id, case_number),
        KEY ix_visit_cases_trainee (trainee_user_id),
        CONSTRAINT fk_visit_cases_visit FOREIGN KEY (visit_id) REFERENCES visits (id),
        CONSTRAINT fk_visit_cases_trainee FOREIGN KEY (trainee_user_id) REFERENCES users (id),
        CONSTRAINT fk_visit_cases_recorded_by FOREIGN KEY (recorded_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_visit_cases_role CHECK (trainee_role IN ('observed', 'assisted', 'performed_supervised'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE visit_sign_offs (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        visit_id INT UNSIGNED NOT NULL,
        trainee_user_id INT UNSIGNED NOT NULL,
        proctor_user_id INT UNSIGNED NOT NULL,
        proctored_cases INT UNSIGNED NOT NULL,
        threshold INT UNSIGNED NOT NULL,
        statement TEXT NOT NULL,
        signed_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_visit_sign_offs_trainee (visit_id, trainee_user_id),
        CONSTRAINT fk_visit_sign_offs_visit FOREIGN KEY (visit_id) REFERENCES visits (id),
        CONSTRAINT fk_visit_sign_offs_trainee FOREIGN KEY (trainee_user_id) REFERENCES users (id),
        CONSTRAINT fk_visit_sign_offs_proctor FOREIGN KEY (proctor_user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE IF EXISTS typeorm_metadata');
    for (const table of [
      'visit_sign_offs',
      'visit_cases',
      'visit_events',
      'visit_offers',
      'visits',
      'proctor_credentials',
      'proctor_experience',
      'proctor_profiles',
    ]) {
      await q.query(`DROP TABLE ${table}`);
    }
    await q.query('DROP SEQUENCE visit_reference_seq');
    await q.query('ALTER TABLE sites DROP COLUMN subdivision');
    await q.query('ALTER TABLE lender_settings DROP COLUMN min_supervised_cases');
    await q.query('ALTER TABLE organisations DROP COLUMN sign_off_threshold');
  }
}
