import {
  DataTypes,
  Model,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class CategoryOwner extends Model<
  InferAttributes<CategoryOwner>,
  InferCreationAttributes<CategoryOwner>
> {
  declare categoryId: number;
  declare userId: number;

  static initModel(sequelize: Sequelize): void {
    CategoryOwner.init(
      {
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
      },
      { sequelize, tableName: 'category_owners', timestamps: false },
    );
  }
}
