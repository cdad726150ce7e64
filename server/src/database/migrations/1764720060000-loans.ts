import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Evaluation loans: the loan (overall milestones, deposit estimate), its units (per-unit
 * milestones), the holds that block units (a loan's footprint or maintenance) and the loan's
 * event trail. Calendar dates are DATE with the zone they belong to stored beside them.
 */
export class Loans1764720060000 implements MigrationInterface {
  name = 'Loans1764720060000';

  async up(q: QueryRunner): Promise<void> {
    // Reference numbers (EV-<year>-<number>) come from a sequence: unlike the auto-increment id,
    // the number is known before the INSERT, so the row is written complete in one statement.
    await q.query('CREATE SEQUENCE loan_reference_seq START WITH 1 INCREMENT BY 1');

    await q.query(`
      CREATE TABLE loans (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        reference VARCHAR(24) NOT NULL,
        state VARCHAR(16) NOT NULL,
        hospital_id INT UNSIGNED NOT NULL,
        site_id INT UNSIGNED NOT NULL,
        site_time_zone VARCHAR(64) NOT NULL,
        lender_id INT UNSIGNED NOT NULL,
        use_from DATE NOT NULL,
        use_to DATE NOT NULL,
        ship_by DATE NOT NULL,
        deliver_by DATE NOT NULL,
        return_ship_by DATE NOT NULL,
        back_at_depot DATE NOT NULL,
        ready_again DATE NOT NULL,
        deposit_amount BIGINT UNSIGNED NOT NULL,
        deposit_currency CHAR(3) NOT NULL,
        note TEXT NULL,
        requested_by_user_id INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_loans_reference (reference),
        KEY ix_loans_hospital_state (hospital_id, state),
        KEY ix_loans_lender_state (lender_id, state),
        KEY ix_loans_state (state),
        CONSTRAINT fk_loans_hospital FOREIGN KEY (hospital_id) REFERENCES organisations (id),
        CONSTRAINT fk_loans_site FOREIGN KEY (site_id) REFERENCES sites (id),
        CONSTRAINT fk_loans_lender FOREIGN KEY (lender_id) REFERENCES organisations (id),
        CONSTRAINT fk_loans_requested_by FOREIGN KEY (requested_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_loans_state CHECK (state IN ('requested', 'approved', 'confirmed', 'shipped', 'delivered', 'returning', 'returned', 'closed', 'declined', 'cancelled', 'expired')),
        CONSTRAINT ck_loans_window CHECK (use_to >= use_from AND ship_by <= use_from AND ready_again >= use_to)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // hospital_id is copied from the loan (it never changes) so that "has this hospital
    // borrowed this model before" is one index range.
    await q.query(`
      CREATE TABLE loan_units (
        loan_id INT UNSIGNED NOT NULL,
        unit_id INT UNSIGNED NOT NULL,
        hospital_id INT UNSIGNED NOT NULL,
        model_id INT UNSIGNED NOT NULL,
        depot_id INT UNSIGNED NOT NULL,
        depot_time_zone VARCHAR(64) NOT NULL,
        ship_by DATE NOT NULL,
        deliver_by DATE NOT NULL,
        use_from DATE NOT NULL,
        use_to DATE NOT NULL,
        return_ship_by DATE NOT NULL,
        back_at_depot DATE NOT NULL,
        ready_again DATE NOT NULL,
        deposit_amount BIGINT UNSIGNED NOT NULL,
        PRIMARY KEY (loan_id, unit_id),
        KEY ix_loan_units_unit (unit_id),
        KEY ix_loan_units_hospital_model (hospital_id, model_id),
        CONSTRAINT fk_loan_units_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_loan_units_unit FOREIGN KEY (unit_id) REFERENCES units (id),
        CONSTRAINT fk_loan_units_model FOREIGN KEY (model_id) REFERENCES models (id),
        CONSTRAINT fk_loan_units_depot FOREIGN KEY (depot_id) REFERENCES sites (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // A hold blocks [start_date, end_date] (both included) in the unit's depot calendar.
    // sequence = units.booking_version after the write that made the hold (see the catalog
    // migration): the unique key is the second guard against double booking.
    await q.query(`
      CREATE TABLE holds (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        unit_id INT UNSIGNED NOT NULL,
        kind VARCHAR(16) NOT NULL,
        start_date DATE NOT NULL,
        end_date DATE NOT NULL,
        loan_id INT UNSIGNED NULL,
        reason VARCHAR(300) NULL,
        sequence INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        created_by_user_id INT UNSIGNED NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_holds_unit_sequence (unit_id, sequence),
        KEY ix_holds_unit_end (unit_id, end_date, start_date),
        KEY ix_holds_loan (loan_id),
        CONSTRAINT fk_holds_unit FOREIGN KEY (unit_id) REFERENCES units (id),
        CONSTRAINT fk_holds_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_holds_user FOREIGN KEY (created_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_holds_kind CHECK ((kind = 'loan' AND loan_id IS NOT NULL) OR (kind = 'maintenance' AND loan_id IS NULL)),
        CONSTRAINT ck_holds_dates CHECK (end_date >= start_date)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE loan_events (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        loan_id INT UNSIGNED NOT NULL,
        at DATETIME(3) NOT NULL,
        actor_user_id INT UNSIGNED NULL,
        from_state VARCHAR(16) NULL,
        to_state VARCHAR(16) NOT NULL,
        reason TEXT NULL,
        PRIMARY KEY (id),
        KEY ix_loan_events_loan (loan_id, id),
        CONSTRAINT fk_loan_events_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_loan_events_actor FOREIGN KEY (actor_user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of ['loan_events', 'holds', 'loan_units', 'loans']) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
    await q.query('DROP SEQUENCE IF EXISTS loan_reference_seq');
  }
}
