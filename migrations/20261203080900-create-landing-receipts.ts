import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/** What Ballast's local webhook receiver (the Landing) was sent, and whether each signature held. */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('landing_receipts', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    path: { type: DataTypes.STRING(500), allowNull: false },
    event_id: { type: DataTypes.STRING(60), allowNull: true },
    timestamp_header: { type: DataTypes.STRING(40), allowNull: true },
    signature_header: { type: DataTypes.STRING(200), allowNull: true },
    verdict: { type: DataTypes.STRING(40), allowNull: false },
    repeat_of: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    body: { type: DataTypes.TEXT('medium'), allowNull: false },
    received_at: { type: DataTypes.DATE(3), allowNull: false },
  });
  await qi.addIndex('landing_receipts', ['event_id'], { name: 'landing_receipts_event' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('landing_receipts');
};
