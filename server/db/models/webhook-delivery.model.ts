import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type WebhookDeliveryStatus = 'queued' | 'sending' | 'sent' | 'failed';

export class WebhookDelivery extends Model<
  InferAttributes<WebhookDelivery>,
  InferCreationAttributes<WebhookDelivery>
> {
  declare id: CreationOptional<number>;
  declare webhookId: number;
  declare alertId: number | null;
  declare eventId: string;
  declare body: string;
  declare status: WebhookDeliveryStatus;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: Date | null;
  declare leaseUntil: Date | null;
  declare lastError: string | null;
  declare responseStatus: number | null;
  declare sentAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    WebhookDelivery.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        webhookId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        alertId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        eventId: { type: DataTypes.STRING(60), allowNull: false },
        body: { type: DataTypes.TEXT('medium'), allowNull: false },
        status: { type: DataTypes.ENUM('queued', 'sending', 'sent', 'failed'), allowNull: false },
        attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        nextAttemptAt: { type: DataTypes.DATE(3), allowNull: true },
        leaseUntil: { type: DataTypes.DATE(3), allowNull: true },
        lastError: { type: DataTypes.STRING(1000), allowNull: true },
        responseStatus: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'webhook_deliveries' },
    );
  }
}
