import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('import_row_errors', {
    id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
    batch_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'import_batches', key: 'id' },
      onDelete: 'CASCADE',
    },
    line: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    column_name: { type: DataTypes.STRING(60), allowNull: true },
    reason: { type: DataTypes.STRING(500), allowNull: false },
    raw: { type: DataTypes.TEXT, allowNull: true },
  });
  await qi.addIndex('import_row_errors', ['batch_id', 'line'], { name: 'import_row_errors_batch_line' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('import_row_errors');
};
