import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The lender's catalogue: shipping settings per lender, models with packing lists, symmetric
 * compatibility and photos, and the physical units with their base depot. Money is integer
 * minor units beside an ISO 4217 code.
 */
export class Catalog1764720000000 implements MigrationInterface {
  name = 'Catalog1764720000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE lender_settings (
        organisation_id INT UNSIGNED NOT NULL,
        distance_bands JSON NOT NULL,
        customs_days TINYINT UNSIGNED NOT NULL,
        lead_days TINYINT UNSIGNED NOT NULL,
        first_loan_lead_days TINYINT UNSIGNED NOT NULL,
        decontamination_days TINYINT UNSIGNED NOT NULL,
        turnaround_days TINYINT UNSIGNED NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        updated_by_user_id INT UNSIGNED NULL,
        PRIMARY KEY (organisation_id),
        CONSTRAINT fk_lender_settings_organisation FOREIGN KEY (organisation_id) REFERENCES organisations (id),
        CONSTRAINT fk_lender_settings_user FOREIGN KEY (updated_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_lender_settings_bands CHECK (JSON_VALID(distance_bands)),
        CONSTRAINT ck_lender_settings_lead CHECK (lead_days >= 1 AND first_loan_lead_days >= 1)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE models (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        lender_id INT UNSIGNED NOT NULL,
        name VARCHAR(160) NOT NULL,
        category VARCHAR(32) NOT NULL,
        description TEXT NOT NULL,
        list_value BIGINT UNSIGNED NOT NULL,
        currency CHAR(3) NOT NULL,
        deposit_percent_bps SMALLINT UNSIGNED NOT NULL,
        deposit_min BIGINT UNSIGNED NOT NULL,
        deposit_max BIGINT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_models_lender_name (lender_id, name),
        KEY ix_models_category (category),
        CONSTRAINT fk_models_lender FOREIGN KEY (lender_id) REFERENCES organisations (id),
        CONSTRAINT ck_models_category CHECK (category IN ('robotic_platform', 'flexible_endoscope', 'laser', 'imaging', 'fluid_management', 'accessory')),
        CONSTRAINT ck_models_deposit CHECK (deposit_percent_bps <= 10000 AND deposit_max >= deposit_min)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE model_packing_items (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        model_id INT UNSIGNED NOT NULL,
        position SMALLINT UNSIGNED NOT NULL,
        name VARCHAR(160) NOT NULL,
        gtin CHAR(14) NULL,
        quantity SMALLINT UNSIGNED NOT NULL,
        serialised TINYINT(1) NOT NULL DEFAULT 0,
        PRIMARY KEY (id),
        KEY ix_model_packing_items_model (model_id, position),
        CONSTRAINT fk_model_packing_items_model FOREIGN KEY (model_id) REFERENCES models (id) ON DELETE CASCADE,
        CONSTRAINT ck_model_packing_items_gtin CHECK (gtin IS NULL OR gtin REGEXP '^[0-9]{14}$'),
        CONSTRAINT ck_model_packing_items_quantity CHECK (quantity >= 1)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // Both directions are stored, so "compatible with X" is one index lookup either way.
    await q.query(`
      CREATE TABLE model_compatibility (
        model_id INT UNSIGNED NOT NULL,
        compatible_model_id INT UNSIGNED NOT NULL,
        PRIMARY KEY (model_id, compatible_model_id),
        KEY ix_model_compatibility_other (compatible_model_id),
        CONSTRAINT fk_model_compatibility_model FOREIGN KEY (model_id) REFERENCES models (id) ON DELETE CASCADE,
        CONSTRAINT fk_model_compatibility_other FOREIGN KEY (compatible_model_id) REFERENCES models (id) ON DELETE CASCADE,
        CONSTRAINT ck_model_compatibility_self CHECK (model_id <> compatible_model_id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE model_photos (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        model_id INT UNSIGNED NOT NULL,
        storage_key VARCHAR(120) NOT NULL,
        content_type VARCHAR(32) NOT NULL,
        size_bytes INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        created_by_user_id INT UNSIGNED NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_model_photos_storage_key (storage_key),
        KEY ix_model_photos_model (model_id),
        CONSTRAINT fk_model_photos_model FOREIGN KEY (model_id) REFERENCES models (id),
        CONSTRAINT fk_model_photos_user FOREIGN KEY (created_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_model_photos_type CHECK (content_type IN ('image/jpeg', 'image/png', 'image/webp'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // booking_version counts every change to the unit's holds; each hold row records the value
    // it was written under, and UNIQUE (unit_id, sequence) on holds turns two writers that both
    // skipped the row lock into a duplicate-key error instead of a double booking.
    await q.query(`
      CREATE TABLE units (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        model_id INT UNSIGNED NOT NULL,
        serial_number VARCHAR(60) NOT NULL,
        udi_di CHAR(14) NULL,
        home_depot_id INT UNSIGNED NOT NULL,
        status VARCHAR(16) NOT NULL,
        booking_version INT UNSIGNED NOT NULL DEFAULT 0,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_units_model_serial (model_id, serial_number),
        KEY ix_units_status_model (status, model_id),
        KEY ix_units_home_depot (home_depot_id),
        CONSTRAINT fk_units_model FOREIGN KEY (model_id) REFERENCES models (id),
        CONSTRAINT fk_units_home_depot FOREIGN KEY (home_depot_id) REFERENCES sites (id),
        CONSTRAINT ck_units_status CHECK (status IN ('active', 'maintenance', 'retired')),
        CONSTRAINT ck_units_udi_di CHECK (udi_di IS NULL OR udi_di REGEXP '^[0-9]{14}$')
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of [
      'units',
      'model_photos',
      'model_compatibility',
      'model_packing_items',
      'models',
      'lender_settings',
    ]) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
  }
}
