import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { DeliveryStatus } from '../../../shared/schemas/digests.schema';

export class MailDelivery extends Model<
  InferAttributes<MailDelivery>,
  InferCreationAttributes<MailDelivery>
> {
  declare id: CreationOptional<number>;
  /** The digest this mail carries, or null for an alert mail. */
  declare digestId: number | null;
  declare alertMailId: CreationOptional<number | null>;
  declare recipient: string;
  declare target: string;
  declare status: DeliveryStatus;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date | null;
  declare leaseUntil: Date | null;
  declare lastError: string | null;
  declare messageId: string;
  declare sentAt: Date | null;
  declare unsubscribedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    MailDelivery.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        digestId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        alertMailId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        recipient: { type: DataTypes.STRING(254), allowNull: false },
        target: { type: DataTypes.STRING(40), allowNull: false },
        status: { type: DataTypes.ENUM('queued', 'sending', 'sent', 'failed'), allowNull: false },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        nextAttemptAt: { type: DataTypes.DATE, allowNull: true },
        leaseUntil: { type: DataTypes.DATE, allowNull: true },
        lastError: { type: DataTypes.STRING(1000), allowNull: true },
        messageId: { type: DataTypes.STRING(200), allowNull: false },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        unsubscribedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'mail_deliveries' },
    );
  }
}
