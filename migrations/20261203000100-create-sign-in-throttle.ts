import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/** Failed sign-ins per address within a window, shared by every app server on the database. */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('sign_in_throttle', {
    bucket: { type: DataTypes.STRING(200), primaryKey: true },
    hits: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    reset_at: { type: DataTypes.DATE(3), allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('sign_in_throttle');
};
