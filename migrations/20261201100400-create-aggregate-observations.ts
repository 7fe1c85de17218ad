import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('aggregate_observations', {
    id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
    item_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'items', key: 'id' },
      onDelete: 'CASCADE',
    },
    observed_on: { type: DataTypes.DATEONLY, allowNull: false },
    review_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    mean_stars: { type: DataTypes.DECIMAL(7, 5), allowNull: true },
    stars_1: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    stars_2: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    stars_3: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    stars_4: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    stars_5: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    newest_review_at: { type: DataTypes.DATE, allowNull: true },
    import_batch_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('aggregate_observations', ['item_id', 'observed_on'], {
    unique: true,
    name: 'aggregate_observations_item_date',
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('aggregate_observations');
};
