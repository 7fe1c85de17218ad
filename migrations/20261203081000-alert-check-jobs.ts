import type { Migration } from '../server/db/migrator';

/**
 * The daily alert check is a job kind and a schedule kind, and Ballast starts with one daily schedule of it
 * (07:00 UTC, every category) so alerts about time passing (going stale) arrive without new evidence.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.sequelize.query(
    "ALTER TABLE job_runs MODIFY kind ENUM('snapshot','backfill','digest','alerts') NOT NULL",
  );
  await qi.sequelize.query(
    "ALTER TABLE report_schedules MODIFY produce ENUM('snapshot','snapshot_digest','alerts') NOT NULL",
  );
  await qi.sequelize.query(
    `INSERT INTO report_schedules (name, cron, time_zone, category_ids, recipients, produce, enabled, created_by, created_at, updated_at)
     VALUES ('Daily alert check', '0 7 * * *', 'UTC', NULL, '[]', 'alerts', 1, NULL, NOW(), NOW())`,
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.sequelize.query("DELETE FROM report_schedules WHERE produce = 'alerts'");
  await qi.sequelize.query("DELETE FROM job_runs WHERE kind = 'alerts'");
  await qi.sequelize.query(
    "ALTER TABLE report_schedules MODIFY produce ENUM('snapshot','snapshot_digest') NOT NULL",
  );
  await qi.sequelize.query("ALTER TABLE job_runs MODIFY kind ENUM('snapshot','backfill','digest') NOT NULL");
};
