import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('category_owners', {
    category_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'categories', key: 'id' },
      onDelete: 'CASCADE',
    },
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      primaryKey: true,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
    },
  });
  // The primary key serves "owners of a category"; this one serves "categories of a user".
  await qi.addIndex('category_owners', ['user_id'], { name: 'category_owners_user' });
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('category_owners');
};
