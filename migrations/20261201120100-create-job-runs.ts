import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('job_runs', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    schedule_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'report_schedules', key: 'id' },
      onDelete: 'SET NULL',
    },
    kind: { type: DataTypes.ENUM('snapshot', 'backfill', 'digest'), allowNull: false },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'categories', key: 'id' },
      onDelete: 'SET NULL',
    },
    iso_week: { type: DataTypes.STRING(8), allowNull: true },
    due_at: { type: DataTypes.DATE, allowNull: true },
    status: {
      type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed'),
      allowNull: false,
      defaultValue: 'queued',
    },
    trigger: { type: DataTypes.ENUM('schedule', 'catch_up', 'manual', 'retry'), allowNull: false },
    params: { type: DataTypes.JSON, allowNull: true },
    started_at: { type: DataTypes.DATE(3), allowNull: true },
    finished_at: { type: DataTypes.DATE(3), allowNull: true },
    duration_ms: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    rows: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    log: { type: DataTypes.TEXT, allowNull: true },
    error: { type: DataTypes.STRING(2000), allowNull: true },
    attempt: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    retry_of: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_by: { type: DataTypes.STRING(254), allowNull: true },
    heartbeat_at: { type: DataTypes.DATE(3), allowNull: true },
    owner: { type: DataTypes.STRING(120), allowNull: true },
    created_at: { type: DataTypes.DATE(3), allowNull: false },
    updated_at: { type: DataTypes.DATE(3), allowNull: false },
  });
  // One run per schedule, due time and category, whichever app server inserts it first. Manual runs have
  // no due time, and NULLs never collide in a MariaDB unique key, so they are not limited by it.
  await qi.addIndex('job_runs', ['schedule_id', 'due_at', 'category_id'], {
    name: 'job_runs_once_per_due',
    unique: true,
  });
  await qi.addIndex('job_runs', ['status', 'created_at'], { name: 'job_runs_status' });
  await qi.addIndex('job_runs', ['category_id', 'created_at'], { name: 'job_runs_category' });
  await qi.addIndex('job_runs', ['created_at'], { name: 'job_runs_created' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('job_runs');
};
