import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('mail_deliveries', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    digest_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'digests', key: 'id' },
      onDelete: 'CASCADE',
    },
    recipient: { type: DataTypes.STRING(254), allowNull: false },
    // 'category:<id>' or 'portfolio': what the unsubscribe link of this mail turns off
    target: { type: DataTypes.STRING(40), allowNull: false },
    status: { type: DataTypes.ENUM('queued', 'sending', 'sent', 'failed'), allowNull: false },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE, allowNull: true },
    // while status is 'sending': the claim of one worker; an expired lease means the worker died mid-send
    lease_until: { type: DataTypes.DATE, allowNull: true },
    last_error: { type: DataTypes.STRING(1000), allowNull: true },
    // chosen when queued and reused by every attempt, so a resend after a crash can be recognised
    message_id: { type: DataTypes.STRING(200), allowNull: false },
    sent_at: { type: DataTypes.DATE, allowNull: true },
    unsubscribed_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('mail_deliveries', ['digest_id', 'recipient'], {
    name: 'mail_deliveries_digest_recipient',
    unique: true,
  });
  await qi.addIndex('mail_deliveries', ['status', 'next_attempt_at'], { name: 'mail_deliveries_due' });
  await qi.addIndex('mail_deliveries', ['message_id'], { name: 'mail_deliveries_message_id', unique: true });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('mail_deliveries');
};
