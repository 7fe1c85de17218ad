import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  // What Ballast's local SMTP server received; one row per Message-ID (a resend adds to `copies`).
  await qi.createTable('outbox_messages', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    message_id: { type: DataTypes.STRING(200), allowNull: false },
    envelope_from: { type: DataTypes.STRING(254), allowNull: false },
    envelope_to: { type: DataTypes.JSON, allowNull: false },
    subject: { type: DataTypes.STRING(500), allowNull: false },
    raw: { type: DataTypes.BLOB('long'), allowNull: false },
    size_bytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    copies: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    received_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('outbox_messages', ['message_id'], { name: 'outbox_messages_message_id', unique: true });
  await qi.addIndex('outbox_messages', ['received_at'], { name: 'outbox_messages_received_at' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('outbox_messages');
};
