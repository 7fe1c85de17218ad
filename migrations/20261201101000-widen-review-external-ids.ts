import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

// The import formats allow ids of up to 128 characters (importLimits.idMax); the first schema kept 120.
export const up: Migration = async ({ context: qi }) => {
  await qi.changeColumn('reviews', 'external_id', { type: DataTypes.STRING(128), allowNull: false });
  await qi.changeColumn('reviews', 'reviewer_external_id', { type: DataTypes.STRING(128), allowNull: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.changeColumn('reviews', 'external_id', { type: DataTypes.STRING(120), allowNull: false });
  await qi.changeColumn('reviews', 'reviewer_external_id', { type: DataTypes.STRING(120), allowNull: true });
};
