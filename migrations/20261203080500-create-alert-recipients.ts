import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * One alert for one person: waiting (for the next batch or the end of quiet hours), mailed (in one alert
 * mail, a row of alert_mails), or held back by the rule's daily limit.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alert_mails', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    recipient: { type: DataTypes.STRING(254), allowNull: false },
    alert_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    held_count: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.createTable('alert_recipients', {
    alert_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'alerts', key: 'id' },
      onDelete: 'CASCADE',
    },
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    status: { type: DataTypes.ENUM('waiting', 'mailed', 'held'), allowNull: false },
    alert_mail_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'alert_mails', key: 'id' },
      onDelete: 'SET NULL',
    },
    settled_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('alert_recipients', ['status', 'user_id'], { name: 'alert_recipients_status' });
  await qi.addIndex('alert_recipients', ['user_id', 'settled_at'], { name: 'alert_recipients_user' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alert_recipients');
  await qi.dropTable('alert_mails');
};
