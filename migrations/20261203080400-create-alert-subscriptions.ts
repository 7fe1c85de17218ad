import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * One person's choice for one rule of one category. Without a row, a manager receives every rule of the
 * categories they own and everyone else receives none.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alert_subscriptions', {
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    rule: { type: DataTypes.STRING(40), primaryKey: true },
    subscribed: { type: DataTypes.BOOLEAN, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alert_subscriptions');
};
