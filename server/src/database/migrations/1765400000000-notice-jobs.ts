import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * `notice_jobs`: a business event whose e-mails (and calendar invites) and in-app notifications
 * are rendered later by the outbox worker instead of inside the transaction that made the
 * change. The row commits with the change (so nothing is lost); the worker renders it into
 * `outbox_messages` and `notifications` and deletes it in one transaction. `dedupe_key` keeps a
 * replayed event to one job; the due index serves the worker's `FOR UPDATE SKIP LOCKED` claim.
 */
export class NoticeJobs1765400000000 implements MigrationInterface {
  name = 'NoticeJobs1765400000000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE notice_jobs (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        kind VARCHAR(16) NOT NULL,
        payload JSON NOT NULL,
        status VARCHAR(16) NOT NULL DEFAULT 'pending',
        attempts SMALLINT UNSIGNED NOT NULL DEFAULT 0,
        next_attempt_at DATETIME(3) NOT NULL,
        last_error VARCHAR(2000) NULL,
        created_at DATETIME(3) NOT NULL,
        dedupe_key VARCHAR(190) NOT NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_notice_jobs_dedupe_key (dedupe_key),
        KEY ix_notice_jobs_due (status, next_attempt_at, id),
        CONSTRAINT ck_notice_jobs_kind CHECK (kind IN ('loan')),
        CONSTRAINT ck_notice_jobs_status CHECK (status IN ('pending', 'parked'))
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE notice_jobs');
  }
}
