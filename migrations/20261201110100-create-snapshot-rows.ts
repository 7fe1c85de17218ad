import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  const dbl = { type: DataTypes.DOUBLE, allowNull: true };
  await qi.createTable('snapshot_rows', {
    snapshot_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'snapshots', key: 'id' },
      onDelete: 'CASCADE',
    },
    item_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'items', key: 'id' },
      onDelete: 'CASCADE',
    },
    n: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    raw_mean: dbl,
    smoothed: { type: DataTypes.DOUBLE, allowNull: false },
    lower_bound: { type: DataTypes.DOUBLE, allowNull: false },
    naive_rank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    smoothed_rank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    drift: { type: DataTypes.INTEGER, allowNull: false },
    naive_movement: { type: DataTypes.INTEGER, allowNull: true },
    smoothed_movement: { type: DataTypes.INTEGER, allowNull: true },
    newest_age_days: dbl,
    median_age_days: dbl,
    recent_share: dbl,
    decayed_mean: dbl,
    effective_count: dbl,
    helpful_mean: dbl,
    reviewer_mean: dbl,
    one_star_share: dbl,
    stale: { type: DataTypes.BOOLEAN, allowNull: true },
    thin: { type: DataTypes.BOOLEAN, allowNull: false },
    negative_cluster: { type: DataTypes.BOOLEAN, allowNull: true },
    reviews_to_pass: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    /** Histogram, reasons, recurring phrases, most helpful review, what-it-takes details. */
    details: { type: DataTypes.JSON, allowNull: false },
  });
  // The item timeline reads one item's rows across weeks.
  await qi.addIndex('snapshot_rows', ['item_id', 'snapshot_id'], { name: 'snapshot_rows_item' });
  await qi.addIndex('snapshot_rows', ['snapshot_id', 'smoothed_rank'], {
    name: 'snapshot_rows_smoothed_rank',
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('snapshot_rows');
};
