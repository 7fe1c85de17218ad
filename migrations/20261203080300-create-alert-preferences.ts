import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * One person's alert mail settings. Quiet hours are wall-clock times in the person's IANA time zone
 * (minutes after local midnight), so they follow daylight-saving changes; from == until means none.
 */
export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('alert_preferences', {
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
    time_zone: { type: DataTypes.STRING(64), allowNull: false },
    quiet_from_minute: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    quiet_until_minute: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('alert_preferences');
};
