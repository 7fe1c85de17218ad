import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class OutboxMessage extends Model<
  InferAttributes<OutboxMessage>,
  InferCreationAttributes<OutboxMessage>
> {
  declare id: CreationOptional<number>;
  declare messageId: string;
  declare envelopeFrom: string;
  declare envelopeTo: string[];
  declare subject: string;
  declare raw: Buffer;
  declare sizeBytes: number;
  declare copies: CreationOptional<number>;
  declare receivedAt: Date;

  static initModel(sequelize: Sequelize): void {
    OutboxMessage.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        messageId: { type: DataTypes.STRING(200), allowNull: false },
        envelopeFrom: { type: DataTypes.STRING(254), allowNull: false },
        envelopeTo: { type: DataTypes.JSON, allowNull: false },
        subject: { type: DataTypes.STRING(500), allowNull: false },
        raw: { type: DataTypes.BLOB('long'), allowNull: false },
        sizeBytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        copies: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        receivedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'outbox_messages', timestamps: false },
    );
  }
}
