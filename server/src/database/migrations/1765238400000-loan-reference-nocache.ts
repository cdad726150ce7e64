import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Loan references come from `loan_reference_seq`. MariaDB sequences cache 1,000 values by
 * default and lose the unused rest when the server restarts, so after each restart the next
 * reference jumped by up to 1,000 (seen in the demo: EV-2026-001033 for the thirty-third loan).
 * References are what people read out on the phone; without the cache each number is written
 * when it is taken, and a restart loses none.
 */
export class LoanReferenceNocache1765238400000 implements MigrationInterface {
  name = 'LoanReferenceNocache1765238400000';

  async up(q: QueryRunner): Promise<void> {
    await q.query('ALTER SEQUENCE loan_reference_seq NOCACHE');
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('ALTER SEQUENCE loan_reference_seq CACHE 1000');
  }
}
