import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('report_schedules', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    cron: { type: DataTypes.STRING(120), allowNull: false },
    time_zone: { type: DataTypes.STRING(64), allowNull: false },
    // null: every category, including ones added after the schedule was made
    category_ids: { type: DataTypes.JSON, allowNull: true },
    recipients: { type: DataTypes.JSON, allowNull: false },
    produce: { type: DataTypes.ENUM('snapshot', 'snapshot_digest'), allowNull: false },
    enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    // the due time of the newest occurrence already claimed (or deliberately skipped); catch-up compares to it
    last_due_at: { type: DataTypes.DATE, allowNull: true },
    created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('report_schedules', ['name'], { name: 'report_schedules_name', unique: true });
  await qi.addIndex('report_schedules', ['enabled'], { name: 'report_schedules_enabled' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('report_schedules');
};
