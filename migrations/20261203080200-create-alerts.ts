import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * Every alert Ballast raised. `alert_key` (rule, category, item, ISO week) is unique, so the same cluster
 * or the same fall is raised once a week however many imports or checks see it.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alerts', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    alert_key: { type: DataTypes.STRING(400, true), allowNull: false },
    rule: { type: DataTypes.STRING(40), allowNull: false },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    item_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'items', key: 'id' },
      onDelete: 'CASCADE',
    },
    sku: { type: DataTypes.STRING(120), allowNull: false },
    iso_week: { type: DataTypes.STRING(8), allowNull: false },
    source: { type: DataTypes.STRING(40), allowNull: false },
    import_batch_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    snapshot_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    headline: { type: DataTypes.STRING(500), allowNull: false },
    evidence: { type: DataTypes.JSON, allowNull: false },
    raised_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.sequelize.query(
    'ALTER TABLE alerts MODIFY alert_key VARCHAR(400) CHARACTER SET utf8mb4 COLLATE utf8mb4_bin NOT NULL',
  );
  await qi.sequelize.query(
    'ALTER TABLE alerts MODIFY sku VARCHAR(120) CHARACTER SET utf8mb4 COLLATE utf8mb4_bin NOT NULL',
  );
  await qi.addIndex('alerts', ['alert_key'], { name: 'alerts_key', unique: true });
  await qi.addIndex('alerts', ['category_id', 'raised_at'], { name: 'alerts_category_raised' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alerts');
};
