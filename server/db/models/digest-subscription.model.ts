import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class DigestSubscription extends Model<
  InferAttributes<DigestSubscription>,
  InferCreationAttributes<DigestSubscription>
> {
  declare id: CreationOptional<number>;
  declare email: string;
  /** 'category:<id>' or 'portfolio'. */
  declare target: string;
  declare subscribed: boolean;
  declare source: 'web' | 'link';
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    DigestSubscription.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        target: { type: DataTypes.STRING(40), allowNull: false },
        subscribed: { type: DataTypes.BOOLEAN, allowNull: false },
        source: { type: DataTypes.ENUM('web', 'link'), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'digest_subscriptions' },
    );
  }
}
