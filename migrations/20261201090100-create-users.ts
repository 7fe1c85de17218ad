import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('users', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    password_hash: { type: DataTypes.STRING(100), allowNull: false },
    role: {
      type: DataTypes.STRING(20),
      allowNull: false,
      references: { model: 'roles', key: 'code' },
      onUpdate: 'CASCADE',
      onDelete: 'RESTRICT',
    },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    failed_logins: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    locked_until: { type: DataTypes.DATE, allowNull: true },
    last_login_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('users', ['role'], { name: 'users_role' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('users');
};
