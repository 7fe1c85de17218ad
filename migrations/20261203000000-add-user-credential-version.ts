import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * A counter raised whenever a user's credentials change (password reset, disabling). Each session stores
 * the value it was signed in with; a session whose value no longer matches is ended on its next request.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('users', 'credential_version', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: false,
    defaultValue: 0,
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeColumn('users', 'credential_version');
};
