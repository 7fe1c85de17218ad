import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  // An explicit choice per address and digest; without a row the default applies (see the README).
  await qi.createTable('digest_subscriptions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(254), allowNull: false },
    // 'category:<id>' or 'portfolio'
    target: { type: DataTypes.STRING(40), allowNull: false },
    subscribed: { type: DataTypes.BOOLEAN, allowNull: false },
    source: { type: DataTypes.ENUM('web', 'link'), allowNull: false },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.addIndex('digest_subscriptions', ['email', 'target'], {
    name: 'digest_subscriptions_email_target',
    unique: true,
  });
  await qi.addIndex('digest_subscriptions', ['target'], { name: 'digest_subscriptions_target' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('digest_subscriptions');
};
