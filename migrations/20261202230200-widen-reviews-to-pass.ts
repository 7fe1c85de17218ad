import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * "What it would take" can run to billions of reviews and beyond 2^53 (an item just behind a leader
 * scored within a hair of five stars); INT UNSIGNED stopped at 4 294 967 295. A DOUBLE holds the
 * engine's answer as it is: exact up to 2^53, beyond that the smallest double at or above the exact k.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.changeColumn('snapshot_rows', 'reviews_to_pass', { type: DataTypes.DOUBLE, allowNull: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.changeColumn('snapshot_rows', 'reviews_to_pass', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
  });
};
