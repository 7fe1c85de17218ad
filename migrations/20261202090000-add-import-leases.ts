import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * Which server process holds an unfinished import, and until when. A process renews its leases while it
 * runs; another process takes up (or fails) an import only once its lease has run out.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.addColumn('import_batches', 'lease_owner', { type: DataTypes.STRING(120), allowNull: true });
  await qi.addColumn('import_batches', 'lease_until', { type: DataTypes.DATE(3), allowNull: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.removeColumn('import_batches', 'lease_until');
  await qi.removeColumn('import_batches', 'lease_owner');
};
