import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * A category's choice for one alert rule. No row means the rule's default (shared/schemas/alerts.schema.ts);
 * a row overrides whether it is on, its threshold and how many of its alerts one person gets a day.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alert_rules', {
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    rule: { type: DataTypes.STRING(40), primaryKey: true },
    enabled: { type: DataTypes.BOOLEAN, allowNull: false },
    threshold: { type: DataTypes.INTEGER, allowNull: true },
    daily_limit: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    updated_by: { type: DataTypes.STRING(254), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alert_rules');
};
