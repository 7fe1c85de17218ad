import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/** What the last alert evaluation of a category saw, item by item: the "before" of the next evaluation. */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alert_states', {
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    evaluated_at: { type: DataTypes.DATE, allowNull: false },
    source: { type: DataTypes.STRING(40), allowNull: false },
    items: { type: DataTypes.JSON, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alert_states');
};
