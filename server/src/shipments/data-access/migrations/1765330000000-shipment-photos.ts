import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Photos on shipments: the hospital's on receipt (outbound leg) and the depot's for inspection
 * findings (return leg, tied to the finding when the inspection is recorded). The bytes live in
 * the uploads file store under a random key; the row keeps the sniffed type and size.
 */
export class ShipmentPhotos1765330000000 implements MigrationInterface {
  name = 'ShipmentPhotos1765330000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE shipment_photos (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT PRIMARY KEY,
        shipment_id INT UNSIGNED NOT NULL,
        kind VARCHAR(8) NOT NULL,
        finding_id INT UNSIGNED NULL,
        storage_key VARCHAR(64) NOT NULL,
        content_type VARCHAR(16) NOT NULL,
        size_bytes INT UNSIGNED NOT NULL,
        created_by_user_id INT UNSIGNED NULL,
        created_at DATETIME(3) NOT NULL,
        KEY ix_shipment_photos_shipment (shipment_id, kind),
        KEY ix_shipment_photos_finding (finding_id),
        UNIQUE KEY uq_shipment_photos_key (storage_key),
        CONSTRAINT fk_shipment_photos_shipment FOREIGN KEY (shipment_id) REFERENCES shipments (id),
        CONSTRAINT fk_shipment_photos_finding FOREIGN KEY (finding_id)
          REFERENCES inspection_findings (id)
      ) ENGINE=InnoDB`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE shipment_photos');
  }
}
