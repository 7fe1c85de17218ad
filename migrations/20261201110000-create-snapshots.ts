import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('snapshots', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    iso_week: { type: DataTypes.CHAR(8), allowNull: false },
    cutoff: { type: DataTypes.DATE, allowNull: false },
    taken_at: { type: DataTypes.DATE, allowNull: false },
    item_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    review_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    spearman_rho: { type: DataTypes.DOUBLE, allowNull: true },
    kendall_tau_b: { type: DataTypes.DOUBLE, allowNull: true },
    mean_abs_drift: { type: DataTypes.DOUBLE, allowNull: false },
    max_abs_drift: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    stale_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    thin_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    cluster_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    /** The exact parameters used (m, C, z, half-life, thresholds), as the engine resolved them. */
    params: { type: DataTypes.JSON, allowNull: false },
    /** Every category-level figure of the engine, including overlap, RBO and movers. */
    figures: { type: DataTypes.JSON, allowNull: false },
  });
  // One snapshot per category and ISO week, never two.
  await qi.addIndex('snapshots', ['category_id', 'iso_week'], {
    unique: true,
    name: 'snapshots_category_week',
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('snapshots');
};
