import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class Webhook extends Model<InferAttributes<Webhook>, InferCreationAttributes<Webhook>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare url: string;
  declare secret: string;
  declare enabled: CreationOptional<boolean>;
  declare createdBy: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Webhook.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        url: { type: DataTypes.STRING(2000), allowNull: false },
        secret: { type: DataTypes.STRING(200), allowNull: false },
        enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        createdBy: { type: DataTypes.STRING(254), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'webhooks' },
    );
  }
}
