import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The minimum supervised cases a proctor needs on a model before being offered its visits, set
 * by the lender per model. Without a row the lender's default applies
 * (`lender_settings.min_supervised_cases`, 20), so existing models keep today's rule.
 */
export class VisitModelSettings1765324800000 implements MigrationInterface {
  name = 'VisitModelSettings1765324800000';

  async up(q: QueryRunner): Promise<void> {
    await q.query(`
      CREATE TABLE visit_model_settings (
        model_id INT UNSIGNED NOT NULL,
        min_supervised_cases SMALLINT UNSIGNED NOT NULL,
        updated_by_user_id INT UNSIGNED NULL,
        updated_at DATETIME(3) NOT NULL,
        PRIMARY KEY (model_id),
        KEY ix_visit_model_settings_user (updated_by_user_id),
        CONSTRAINT fk_visit_model_settings_model FOREIGN KEY (model_id) REFERENCES models (id),
        CONSTRAINT fk_visit_model_settings_user FOREIGN KEY (updated_by_user_id) REFERENCES users (id)
      ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4 COLLATE=utf8mb4_unicode_ci`);
  }

  async down(q: QueryRunner): Promise<void> {
    await q.query('DROP TABLE visit_model_settings');
  }
}
