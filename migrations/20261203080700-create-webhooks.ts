import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * Addresses an administrator registered to receive alerts as signed JSON. The secret is kept because every
 * delivery is signed with it; it is shown once, when the webhook is created.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('webhooks', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    url: { type: DataTypes.STRING(2000), allowNull: false },
    secret: { type: DataTypes.STRING(200), allowNull: false },
    enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    created_by: { type: DataTypes.STRING(254), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('webhooks');
};
