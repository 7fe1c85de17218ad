import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('calibration_notes', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    iso_week: { type: DataTypes.CHAR(8), allowNull: false },
    note: { type: DataTypes.STRING(2000), allowNull: false, defaultValue: '' },
    /** The fit as the browser computed it: best interval, tau, strategies on the curve, unexplained items. */
    result: { type: DataTypes.JSON, allowNull: false },
    created_by: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_by_name: { type: DataTypes.STRING(120), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('calibration_notes', ['category_id', 'created_at'], {
    name: 'calibration_notes_category',
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('calibration_notes');
};
