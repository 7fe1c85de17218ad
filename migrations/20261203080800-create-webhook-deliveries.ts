import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/** The webhook queue, leased like mail_deliveries: one row per alert and webhook, retried with backoff. */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('webhook_deliveries', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    webhook_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'webhooks', key: 'id' },
      onDelete: 'CASCADE',
    },
    alert_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'alerts', key: 'id' },
      onDelete: 'SET NULL',
    },
    event_id: { type: DataTypes.STRING(60), allowNull: false },
    body: { type: DataTypes.TEXT('medium'), allowNull: false },
    status: { type: DataTypes.ENUM('queued', 'sending', 'sent', 'failed'), allowNull: false },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE(3), allowNull: true },
    lease_until: { type: DataTypes.DATE(3), allowNull: true },
    last_error: { type: DataTypes.STRING(1000), allowNull: true },
    response_status: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('webhook_deliveries', ['webhook_id', 'alert_id'], {
    name: 'webhook_deliveries_once',
    unique: true,
  });
  await qi.addIndex('webhook_deliveries', ['status', 'next_attempt_at'], { name: 'webhook_deliveries_due' });
  await qi.addIndex('webhook_deliveries', ['event_id'], { name: 'webhook_deliveries_event', unique: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('webhook_deliveries');
};
