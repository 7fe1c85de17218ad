import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * A review text is kept up to 20,000 characters; in utf8mb4 that is up to 80,000 bytes, more than a TEXT
 * column (65,535 bytes) holds, so 20,000 emoji failed the whole import.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.changeColumn('reviews', 'body', { type: DataTypes.TEXT('medium'), allowNull: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.changeColumn('reviews', 'body', { type: DataTypes.TEXT, allowNull: true });
};
