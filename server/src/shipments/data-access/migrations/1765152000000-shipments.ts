import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Shipments and returns: one row per leg (outbound per depot, return per outbound), the
 * checklist lines copied from the models' packing lists, every scan (refusals too), the
 * timeline (state changes and carrier events, each carrier event stored once), the alerts sent
 * (once per condition), inspection findings, the lender's SSCC settings and a claim row per
 * settlement so two submissions at once settle once.
 */
export class Shipments1765152000000 implements MigrationInterface {
  name = 'Shipments1765152000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE shipment_settings (
        lender_id INT UNSIGNED NOT NULL PRIMARY KEY,
        gs1_company_prefix VARCHAR(12) NOT NULL,
        sscc_extension_digit TINYINT UNSIGNED NOT NULL DEFAULT 0,
        next_serial BIGINT UNSIGNED NOT NULL DEFAULT 1,
        updated_at DATETIME(3) NOT NULL,
        CONSTRAINT fk_shipment_settings_lender FOREIGN KEY (lender_id) REFERENCES organisations (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE shipments (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        reference VARCHAR(32) NOT NULL,
        loan_id INT UNSIGNED NOT NULL,
        lender_id INT UNSIGNED NOT NULL,
        hospital_id INT UNSIGNED NOT NULL,
        direction VARCHAR(8) NOT NULL,
        depot_id INT UNSIGNED NOT NULL,
        site_id INT UNSIGNED NOT NULL,
        outbound_id INT UNSIGNED NULL,
        state VARCHAR(16) NOT NULL,
        carrier VARCHAR(32) NULL,
        service VARCHAR(16) NULL,
        tracking_number VARCHAR(40) NULL,
        carrier_status VARCHAR(20) NULL,
        carrier_rank TINYINT UNSIGNED NOT NULL DEFAULT 0,
        sscc CHAR(18) NULL,
        ship_by DATE NOT NULL,
        due_by DATE NOT NULL,
        due_zone VARCHAR(64) NOT NULL,
        overdue_at DATETIME(3) NOT NULL,
        origin_country CHAR(2) NOT NULL,
        destination_country CHAR(2) NOT NULL,
        transit_days TINYINT UNSIGNED NOT NULL,
        eta DATE NULL,
        at_risk BOOLEAN NOT NULL DEFAULT FALSE,
        receipt JSON NULL,
        decontamination JSON NULL,
        handed_over_at DATETIME(3) NULL,
        arrived_at DATETIME(3) NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        UNIQUE KEY uq_shipments_leg (loan_id, direction, depot_id),
        UNIQUE KEY uq_shipments_tracking (tracking_number),
        UNIQUE KEY uq_shipments_sscc (sscc),
        KEY ix_shipments_board (lender_id, state, due_by),
        KEY ix_shipments_hospital (hospital_id, state),
        KEY ix_shipments_open (state, overdue_at),
        CONSTRAINT fk_shipments_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_shipments_depot FOREIGN KEY (depot_id) REFERENCES sites (id),
        CONSTRAINT fk_shipments_site FOREIGN KEY (site_id) REFERENCES sites (id),
        CONSTRAINT fk_shipments_outbound FOREIGN KEY (outbound_id) REFERENCES shipments (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE shipment_items (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        shipment_id INT UNSIGNED NOT NULL,
        position SMALLINT UNSIGNED NOT NULL,
        unit_id INT UNSIGNED NULL,
        name VARCHAR(160) NOT NULL,
        gtin CHAR(14) NULL,
        quantity SMALLINT UNSIGNED NOT NULL,
        scanned SMALLINT UNSIGNED NOT NULL DEFAULT 0,
        needs_lot BOOLEAN NOT NULL,
        needs_serial BOOLEAN NOT NULL,
        needs_expiry BOOLEAN NOT NULL,
        required BOOLEAN NOT NULL,
        manual_reason VARCHAR(500) NULL,
        KEY ix_shipment_items_gtin (shipment_id, gtin),
        CONSTRAINT fk_shipment_items_shipment FOREIGN KEY (shipment_id) REFERENCES shipments (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE shipment_scans (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        shipment_id INT UNSIGNED NOT NULL,
        item_id INT UNSIGNED NULL,
        phase VARCHAR(8) NOT NULL,
        outcome VARCHAR(8) NOT NULL,
        raw VARCHAR(300) NULL,
        code VARCHAR(32) NULL,
        message VARCHAR(500) NULL,
        gtin CHAR(14) NULL,
        lot VARCHAR(20) NULL,
        serial VARCHAR(20) NULL,
        expiry DATE NULL,
        serial_key VARCHAR(40) NULL,
        actor_user_id INT UNSIGNED NULL,
        created_at DATETIME(3) NOT NULL,
        UNIQUE KEY uq_shipment_scans_serial (shipment_id, phase, serial_key),
        KEY ix_shipment_scans_shipment (shipment_id, id),
        CONSTRAINT fk_shipment_scans_shipment FOREIGN KEY (shipment_id) REFERENCES shipments (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE shipment_events (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        shipment_id INT UNSIGNED NOT NULL,
        kind VARCHAR(8) NOT NULL,
        from_state VARCHAR(16) NULL,
        to_state VARCHAR(16) NULL,
        carrier_event_id VARCHAR(64) NULL,
        carrier_status VARCHAR(20) NULL,
        message VARCHAR(500) NOT NULL,
        ignored BOOLEAN NOT NULL DEFAULT FALSE,
        occurred_at DATETIME(3) NOT NULL,
        actor_user_id INT UNSIGNED NULL,
        created_at DATETIME(3) NOT NULL,
        UNIQUE KEY uq_shipment_events_carrier (carrier_event_id),
        KEY ix_shipment_events_shipment (shipment_id, occurred_at),
        CONSTRAINT fk_shipment_events_shipment FOREIGN KEY (shipment_id) REFERENCES shipments (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE shipment_alerts (
        shipment_id INT UNSIGNED NOT NULL,
        kind VARCHAR(24) NOT NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (shipment_id, kind),
        CONSTRAINT fk_shipment_alerts_shipment FOREIGN KEY (shipment_id) REFERENCES shipments (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE inspection_findings (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        loan_id INT UNSIGNED NOT NULL,
        unit_id INT UNSIGNED NULL,
        item_id INT UNSIGNED NULL,
        category VARCHAR(16) NOT NULL,
        note TEXT NOT NULL,
        charge BIGINT UNSIGNED NOT NULL,
        currency CHAR(3) NOT NULL,
        needs_repair BOOLEAN NOT NULL,
        actor_user_id INT UNSIGNED NULL,
        created_at DATETIME(3) NOT NULL,
        KEY ix_inspection_findings_loan (loan_id),
        CONSTRAINT fk_inspection_findings_loan FOREIGN KEY (loan_id) REFERENCES loans (id)
      ) ENGINE=InnoDB`);
    await q.query(`
      CREATE TABLE loan_settlements (
        loan_id INT UNSIGNED NOT NULL PRIMARY KEY,
        status VARCHAR(8) NOT NULL,
        result JSON NULL,
        claimed_at DATETIME(3) NOT NULL,
        finished_at DATETIME(3) NULL,
        CONSTRAINT fk_loan_settlements_loan FOREIGN KEY (loan_id) REFERENCES loans (id)
      ) ENGINE=InnoDB`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const t of [
      'loan_settlements',
      'inspection_findings',
      'shipment_alerts',
      'shipment_events',
      'shipment_scans',
      'shipment_items',
      'shipments',
      'shipment_settings',
    ]) {
      await q.query(`DROP TABLE ${t}`);
    }
  }
}
