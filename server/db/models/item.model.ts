import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class Item extends Model<InferAttributes<Item>, InferCreationAttributes<Item>> {
  declare id: CreationOptional<number>;
  declare categoryId: number;
  declare sku: string;
  declare title: string;
  declare brand: string | null;
  declare url: string | null;
  declare active: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Item.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        sku: { type: DataTypes.STRING(120), allowNull: false },
        title: { type: DataTypes.STRING(500), allowNull: false },
        brand: { type: DataTypes.STRING(120), allowNull: true },
        url: { type: DataTypes.STRING(500), allowNull: true },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'items' },
    );
  }
}
