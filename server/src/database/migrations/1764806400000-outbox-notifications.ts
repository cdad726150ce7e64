import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The transactional e-mail outbox and in-app notifications.
 *
 * `outbox_messages` is written in the same transaction as the business change that causes the
 * e-mail and drained by workers (`FOR UPDATE SKIP LOCKED`); see docs/decisions/0003-outbox.md.
 * `notifications` are the in-app messages of one person each.
 */
export class OutboxNotifications1764806400000 implements MigrationInterface {
  name = 'OutboxNotifications1764806400000';

  async up(q: QueryRunner): Promise<void> {
    // `message_id` is the stable Message-ID (`<uuid@domain>`) so every retry of one row is the
    // same e-mail to the receiving side. `dedupe_key` turns a business event enqueued twice
    // into one row (NULLs do not collide in a unique key). The due index serves the claim query,
    // the lease index the reclaim of rows whose worker died.
    await q.query(`
      CREATE TABLE outbox_messages (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        message_id CHAR(36) CHARACTER SET ascii COLLATE ascii_bin NOT NULL,
        kind VARCHAR(16) NOT NULL DEFAULT 'email',
        to_addresses JSON NOT NULL,
        cc_addresses JSON NULL,
        subject VARCHAR(998) NOT NULL,
        html MEDIUMTEXT NOT NULL,
        text MEDIUMTEXT NOT NULL,
        attachments JSON NULL,
        headers JSON NULL,
        status VARCHAR(16) NOT NULL DEFAULT 'pending',
        attempts SMALLINT UNSIGNED NOT NULL DEFAULT 0,
        next_attempt_at DATETIME(3) NOT NULL,
        last_error VARCHAR(2000) NULL,
        created_at DATETIME(3) NOT NULL,
        sent_at DATETIME(3) NULL,
        locked_by VARCHAR(100) NULL,
        locked_until DATETIME(3) NULL,
        dedupe_key VARCHAR(190) NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_outbox_messages_message_id (message_id),
        UNIQUE KEY uq_outbox_messages_dedupe_key (dedupe_key),
        KEY ix_outbox_messages_due (status, next_attempt_at, id),
        KEY ix_outbox_messages_lease (status, locked_until),
        CONSTRAINT ck_outbox_messages_kind CHECK (kind IN ('email')),
        CONSTRAINT ck_outbox_messages_status CHECK (status IN ('pending', 'sending', 'sent', 'parked')),
        CONSTRAINT ck_outbox_messages_sending CHECK (status <> 'sending' OR (locked_by IS NOT NULL AND locked_until IS NOT NULL)),
        CONSTRAINT ck_outbox_messages_sent CHECK (status <> 'sent' OR sent_at IS NOT NULL)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);

    // The dedupe key is unique per person: one business event notifies several people once each.
    await q.query(`
      CREATE TABLE notifications (
        id INT UNSIGNED NOT NULL AUTO_INCREMENT,
        user_id INT UNSIGNED NOT NULL,
        kind VARCHAR(64) NOT NULL,
        title VARCHAR(200) NOT NULL,
        body VARCHAR(2000) NOT NULL,
        link VARCHAR(500) NULL,
        created_at DATETIME(3) NOT NULL,
        read_at DATETIME(3) NULL,
        dedupe_key VARCHAR(190) NULL,
        PRIMARY KEY (id),
        UNIQUE KEY uq_notifications_user_dedupe (user_id, dedupe_key),
        KEY ix_notifications_user_unread (user_id, read_at, id),
        CONSTRAINT fk_notifications_user FOREIGN KEY (user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE IF EXISTS notifications');
    await q.query('DROP TABLE IF EXISTS outbox_messages');
  }
}
