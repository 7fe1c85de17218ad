import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('items', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    sku: { type: DataTypes.STRING(120), allowNull: false },
    title: { type: DataTypes.STRING(500), allowNull: false },
    brand: { type: DataTypes.STRING(120), allowNull: true },
    url: { type: DataTypes.STRING(500), allowNull: true },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('items', ['category_id', 'sku'], { unique: true, name: 'items_category_sku' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('items');
};
