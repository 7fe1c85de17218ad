import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('reviews', {
    id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
    item_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'items', key: 'id' },
      onDelete: 'CASCADE',
    },
    external_id: { type: DataTypes.STRING(120), allowNull: false },
    stars: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    reviewed_at: { type: DataTypes.DATE, allowNull: false },
    helpful_yes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    helpful_no: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    reviewer_external_id: { type: DataTypes.STRING(120), allowNull: true },
    reviewer_score: { type: DataTypes.DECIMAL(4, 3), allowNull: true },
    verified: { type: DataTypes.BOOLEAN, allowNull: true },
    body: { type: DataTypes.TEXT, allowNull: true },
    import_batch_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  // Idempotent imports: one review per external id and item.
  await qi.addIndex('reviews', ['item_id', 'external_id'], { unique: true, name: 'reviews_item_external' });
  // Snapshot aggregates read (item, date, stars) ranges without touching the rows.
  await qi.addIndex('reviews', ['item_id', 'reviewed_at', 'stars'], { name: 'reviews_item_date_stars' });
  await qi.sequelize.query(
    'ALTER TABLE reviews ADD CONSTRAINT reviews_stars_range CHECK (stars BETWEEN 1 AND 5)',
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('reviews');
};
