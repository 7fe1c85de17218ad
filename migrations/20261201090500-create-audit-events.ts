import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('audit_events', {
    id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
    actor_user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    actor_email: { type: DataTypes.STRING(254), allowNull: true },
    action: { type: DataTypes.STRING(60), allowNull: false },
    target_type: { type: DataTypes.STRING(40), allowNull: true },
    target_id: { type: DataTypes.STRING(80), allowNull: true },
    details: { type: DataTypes.JSON, allowNull: true },
    ip: { type: DataTypes.STRING(64), allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('audit_events', ['created_at'], { name: 'audit_events_created' });
  await qi.addIndex('audit_events', ['action', 'created_at'], { name: 'audit_events_action' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('audit_events');
};
