import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Deposits and confirmations: the payments taken through the payment provider (one row per
 * checkout attempt, hold or charge, or a waiver), every provider event we handled (its id unique,
 * so a webhook delivered twice is handled once), refunds, the lenders' credit agreements with
 * hospitals, the documents of a loan (purchase order, signed loan agreement), and on the loan its
 * deposit deadline, strategy, purchase order number and confirmation time.
 */
export class Payments1764892800000 implements MigrationInterface {
  name = 'Payments1764892800000';

  async up(q: QueryRunner): Promise<void> {
    // The expiry job scans (state, deposit_due_at); the strategy is what secured the deposit.
    await q.query(`
      ALTER TABLE loans
        ADD COLUMN deposit_due_at DATETIME(3) NULL AFTER deposit_currency,
        ADD COLUMN deposit_strategy VARCHAR(32) NULL AFTER deposit_due_at,
        ADD COLUMN purchase_order_number VARCHAR(64) NULL AFTER deposit_strategy,
        ADD COLUMN confirmed_at DATETIME(3) NULL AFTER purchase_order_number,
        ADD KEY ix_loans_state_deposit_due (state, deposit_due_at),
        ADD CONSTRAINT ck_loans_deposit_strategy CHECK (deposit_strategy IS NULL OR deposit_strategy IN ('authorise_hold', 'charge_now_refund_later', 'credit_agreement', 'no_deposit'))`);

    // One row per way the deposit was (to be) secured. `secures_loan` marks the one payment that
    // confirmed the loan; the generated `securing_loan_id` makes "at most one per loan" a unique
    // key, the second guard behind the loan row lock. Any other authorised or captured row is
    // money for a dead loan or a duplicate, and is released.
    await q.query(`
      CREATE TABLE payments (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        loan_id INT UNSIGNED NOT NULL,
        provider VARCHAR(24) NOT NULL,
        kind VARCHAR(16) NOT NULL,
        status VARCHAR(24) NOT NULL,
        amount BIGINT UNSIGNED NOT NULL,
        currency CHAR(3) NOT NULL,
        amount_authorised BIGINT UNSIGNED NOT NULL DEFAULT 0,
        amount_captured BIGINT UNSIGNED NOT NULL DEFAULT 0,
        amount_refunded BIGINT UNSIGNED NOT NULL DEFAULT 0,
        checkout_session_id VARCHAR(255) NULL,
        payment_intent_id VARCHAR(255) NULL,
        secures_loan TINYINT(1) NOT NULL DEFAULT 0,
        securing_loan_id INT UNSIGNED AS (IF(secures_loan = 1, loan_id, NULL)) PERSISTENT,
        purchase_order_number VARCHAR(64) NULL,
        failure_code VARCHAR(64) NULL,
        failure_message VARCHAR(500) NULL,
        settled_at DATETIME(3) NULL,
        settlement JSON NULL,
        created_by_user_id INT UNSIGNED NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_payments_checkout_session (checkout_session_id),
        UNIQUE KEY uq_payments_intent (payment_intent_id),
        UNIQUE KEY uq_payments_securing_loan (securing_loan_id),
        KEY ix_payments_loan (loan_id, id),
        KEY ix_payments_release (secures_loan, status),
        CONSTRAINT fk_payments_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_payments_user FOREIGN KEY (created_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_payments_provider CHECK (provider IN ('processor', 'credit_agreement', 'none')),
        CONSTRAINT ck_payments_kind CHECK (kind IN ('hold', 'charge', 'waived')),
        CONSTRAINT ck_payments_status CHECK (status IN ('pending', 'authorised', 'captured', 'partially_refunded', 'refunded', 'cancelled', 'failed', 'waived')),
        CONSTRAINT ck_payments_refund CHECK (amount_refunded <= amount_captured),
        CONSTRAINT ck_payments_secures CHECK (secures_loan IN (0, 1))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // Each provider event once: the unique id is the idempotency guard of the webhook.
    await q.query(`
      CREATE TABLE payment_events (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        provider_event_id VARCHAR(255) NOT NULL,
        type VARCHAR(100) NOT NULL,
        loan_id INT UNSIGNED NULL,
        payment_id INT UNSIGNED NULL,
        outcome VARCHAR(32) NOT NULL,
        provider_created_at DATETIME(3) NULL,
        received_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_payment_events_provider (provider_event_id),
        KEY ix_payment_events_loan (loan_id, id),
        CONSTRAINT fk_payment_events_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_payment_events_payment FOREIGN KEY (payment_id) REFERENCES payments (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE refunds (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        payment_id INT UNSIGNED NOT NULL,
        loan_id INT UNSIGNED NOT NULL,
        provider_refund_id VARCHAR(255) NOT NULL,
        amount BIGINT UNSIGNED NOT NULL,
        currency CHAR(3) NOT NULL,
        reason VARCHAR(32) NOT NULL,
        status VARCHAR(16) NOT NULL,
        created_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_refunds_provider (provider_refund_id),
        KEY ix_refunds_payment (payment_id),
        KEY ix_refunds_loan (loan_id),
        CONSTRAINT fk_refunds_payment FOREIGN KEY (payment_id) REFERENCES payments (id),
        CONSTRAINT fk_refunds_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT ck_refunds_reason CHECK (reason IN ('loan_not_active', 'duplicate', 'settlement'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    await q.query(`
      CREATE TABLE credit_agreements (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        lender_id INT UNSIGNED NOT NULL,
        hospital_id INT UNSIGNED NOT NULL,
        active TINYINT(1) NOT NULL,
        approved_by_user_id INT UNSIGNED NULL,
        approved_at DATETIME(3) NULL,
        updated_by_user_id INT UNSIGNED NOT NULL,
        created_at DATETIME(3) NOT NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_credit_agreements_pair (lender_id, hospital_id),
        KEY ix_credit_agreements_hospital (hospital_id),
        CONSTRAINT fk_credit_agreements_lender FOREIGN KEY (lender_id) REFERENCES organisations (id),
        CONSTRAINT fk_credit_agreements_hospital FOREIGN KEY (hospital_id) REFERENCES organisations (id),
        CONSTRAINT fk_credit_agreements_approved_by FOREIGN KEY (approved_by_user_id) REFERENCES users (id),
        CONSTRAINT fk_credit_agreements_updated_by FOREIGN KEY (updated_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_credit_agreements_active CHECK (active IN (0, 1))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // Files live outside the web root under a random storage key; the name the person gave is
    // kept only to offer it back on download.
    await q.query(`
      CREATE TABLE loan_documents (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        loan_id INT UNSIGNED NOT NULL,
        kind VARCHAR(24) NOT NULL,
        storage_key VARCHAR(64) NOT NULL,
        original_name VARCHAR(255) NOT NULL,
        content_type VARCHAR(64) NOT NULL,
        size_bytes INT UNSIGNED NOT NULL,
        sha256 CHAR(64) NOT NULL,
        uploaded_by_user_id INT UNSIGNED NOT NULL,
        uploaded_at DATETIME(3) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_loan_documents_storage_key (storage_key),
        KEY ix_loan_documents_loan (loan_id, kind, id),
        CONSTRAINT fk_loan_documents_loan FOREIGN KEY (loan_id) REFERENCES loans (id),
        CONSTRAINT fk_loan_documents_user FOREIGN KEY (uploaded_by_user_id) REFERENCES users (id),
        CONSTRAINT ck_loan_documents_kind CHECK (kind IN ('purchase_order', 'loan_agreement'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    for (const table of [
      'loan_documents',
      'credit_agreements',
      'refunds',
      'payment_events',
      'payments',
    ]) {
      await q.query(`DROP TABLE IF EXISTS ${table}`);
    }
    await q.query(`
      ALTER TABLE loans
        DROP CONSTRAINT ck_loans_deposit_strategy,
        DROP KEY ix_loans_state_deposit_due,
        DROP COLUMN confirmed_at,
        DROP COLUMN purchase_order_number,
        DROP COLUMN deposit_strategy,
        DROP COLUMN deposit_due_at`);
  }
}
