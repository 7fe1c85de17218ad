import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('import_batches', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.ENUM('reviews', 'aggregates'), allowNull: false },
    source: { type: DataTypes.ENUM('upload', 'api', 'demo', 'command'), allowNull: false },
    mode: { type: DataTypes.ENUM('all_or_nothing', 'valid_rows'), allowNull: false },
    status: {
      type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'rejected'),
      allowNull: false,
      defaultValue: 'queued',
    },
    file_name: { type: DataTypes.STRING(255), allowNull: true },
    file_path: { type: DataTypes.STRING(500), allowNull: true },
    file_bytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
    file_sha256: { type: DataTypes.CHAR(64), allowNull: true },
    rows_read: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    rows_accepted: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    rows_rejected: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    rows_inserted: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    rows_updated: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    bytes_done: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, defaultValue: 0 },
    error_message: { type: DataTypes.STRING(1000), allowNull: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    token_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    actor_email: { type: DataTypes.STRING(254), allowNull: true },
    started_at: { type: DataTypes.DATE, allowNull: true },
    finished_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('import_batches', ['created_at'], { name: 'import_batches_created' });
  await qi.addIndex('import_batches', ['status'], { name: 'import_batches_status' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('import_batches');
};
