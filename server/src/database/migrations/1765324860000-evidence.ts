import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Evaluation evidence: de-identified case records of a loan (no calendar dates: a day number
 * within the evaluation), each clinician's survey per loan, and the buyer's decision (one per
 * loan, revisable; earlier versions stay in the audit trail).
 */
export class Evidence1765324860000 implements MigrationInterface {
  name = 'Evidence1765324860000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE evaluation_cases (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        loan_id INT UNSIGNED NOT NULL,
        case_number SMALLINT UNSIGNED NOT NULL,
        evaluation_day SMALLINT UNSIGNED NOT NULL,
        procedure_family VARCHAR(40) NOT NULL,
        unit_ids JSON NOT NULL,
        clinician_user_id INT UNSIGNED NOT NULL,
        setup_minutes DECIMAL(6,1) NOT NULL,
        operative_minutes DECIMAL(6,1) NOT NULL,
        energy_minutes DECIMAL(6,1) NULL,
        target_length_mm DECIMAL(5,1) NULL,
        target_width_mm DECIMAL(5,1) NULL,
        target_height_mm DECIMAL(5,1) NULL,
        outcome VARCHAR(24) NULL,
        complication_grade VARCHAR(4) NULL,
        visit_id INT UNSIGNED NULL,
        device_issues TEXT NULL,
        note TEXT NULL,
        recorded_by_user_id INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_evaluation_cases_number (loan_id, case_number),
        KEY ix_evaluation_cases_clinician (clinician_user_id),
        KEY ix_evaluation_cases_visit (visit_id),
        KEY ix_evaluation_cases_recorded_by (recorded_by_user_id),
        CONSTRAINT fk_evaluation_cases_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_evaluation_cases_clinician FOREIGN KEY (clinician_user_id) REFERENCES users (id),
        CONSTRAINT fk_evaluation_cases_visit FOREIGN KEY (visit_id) REFERENCES visits (id),
        CONSTRAINT fk_evaluation_cases_recorded_by FOREIGN KEY (recorded_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_evaluation_cases_minutes CHECK (setup_minutes >= 0 AND operative_minutes > 0 AND (energy_minutes IS NULL OR energy_minutes >= 0))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`
      CREATE TABLE evaluation_feedback (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        loan_id INT UNSIGNED NOT NULL,
        clinician_user_id INT UNSIGNED NOT NULL,
        ratings JSON NOT NULL,
        comment TEXT NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_evaluation_feedback_clinician (loan_id, clinician_user_id),
        KEY ix_evaluation_feedback_clinician (clinician_user_id),
        CONSTRAINT fk_evaluation_feedback_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_evaluation_feedback_clinician FOREIGN KEY (clinician_user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
    await q.query(`
      CREATE TABLE evaluation_decisions (
        loan_id INT UNSIGNED NOT NULL,
        decision VARCHAR(8) NOT NULL,
        reasons JSON NOT NULL,
        note TEXT NULL,
        decided_by_user_id INT UNSIGNED NOT NULL,
        decided_at DATETIME(3) NOT NULL,
        PRIMARY KEY (loan_id),
        KEY ix_evaluation_decisions_decided_by (decided_by_user_id),
        CONSTRAINT fk_evaluation_decisions_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_evaluation_decisions_decided_by FOREIGN KEY (decided_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_evaluation_decisions_decision CHECK (decision IN ('buy', 'not_now', 'no'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE evaluation_decisions');
    await q.query('DROP TABLE evaluation_feedback');
    await q.query('DROP TABLE evaluation_cases');
  }
}
