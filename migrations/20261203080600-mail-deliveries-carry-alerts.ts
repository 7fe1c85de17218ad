import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/** The one mail queue also carries alert mails: a delivery names either a digest or an alert mail. */
export const up: Migration = async ({ context: qi }) => {
  await qi.changeColumn('mail_deliveries', 'digest_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
  });
  await qi.addColumn('mail_deliveries', 'alert_mail_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
    references: { model: 'alert_mails', key: 'id' },
    onDelete: 'CASCADE',
  });
  await qi.addIndex('mail_deliveries', ['alert_mail_id'], {
    name: 'mail_deliveries_alert_mail',
    unique: true,
  });
};

export const down: Migration = async ({ context: qi }) => {
  // The foreign key leans on the unique index: it goes first, under whatever name MariaDB gave it.
  const [keys] = (await qi.sequelize.query(
    `SELECT CONSTRAINT_NAME AS name FROM information_schema.KEY_COLUMN_USAGE
      WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'mail_deliveries'
        AND COLUMN_NAME = 'alert_mail_id' AND REFERENCED_TABLE_NAME IS NOT NULL`,
  )) as [{ name: string }[], unknown];
  for (const key of keys) await qi.removeConstraint('mail_deliveries', key.name);
  await qi.removeIndex('mail_deliveries', 'mail_deliveries_alert_mail');
  await qi.removeColumn('mail_deliveries', 'alert_mail_id');
  await qi.sequelize.query('DELETE FROM mail_deliveries WHERE digest_id IS NULL');
  await qi.changeColumn('mail_deliveries', 'digest_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: false,
  });
};
