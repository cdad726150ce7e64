import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The hospital's consent to share a loan's evaluation report with the lender: one row per loan,
 * changed only by the hospital's buyers (each change is in the audit trail). No row means not
 * shared: case records are the hospital's.
 */
export class EvidenceSharing1765411200000 implements MigrationInterface {
  name = 'EvidenceSharing1765411200000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE evaluation_sharing (
        loan_id INT UNSIGNED NOT NULL,
        shared_with_lender TINYINT(1) NOT NULL,
        changed_by_user_id INT UNSIGNED NOT NULL,
        changed_at DATETIME(3) NOT NULL,
        PRIMARY KEY (loan_id),
        KEY ix_evaluation_sharing_changed_by (changed_by_user_id),
        CONSTRAINT fk_evaluation_sharing_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_evaluation_sharing_changed_by FOREIGN KEY (changed_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_evaluation_sharing_flag CHECK (shared_with_lender IN (0, 1))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE evaluation_sharing');
  }
}
