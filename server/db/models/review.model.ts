import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class Review extends Model<InferAttributes<Review>, InferCreationAttributes<Review>> {
  declare id: CreationOptional<number>;
  declare itemId: number;
  declare externalId: string;
  declare stars: number;
  declare reviewedAt: Date;
  declare helpfulYes: CreationOptional<number>;
  declare helpfulNo: CreationOptional<number>;
  declare reviewerExternalId: string | null;
  declare reviewerScore: number | null;
  declare verified: boolean | null;
  declare body: string | null;
  declare importBatchId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Review.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        itemId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        externalId: { type: DataTypes.STRING(120), allowNull: false },
        stars: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
        reviewedAt: { type: DataTypes.DATE, allowNull: false },
        helpfulYes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        helpfulNo: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        reviewerExternalId: { type: DataTypes.STRING(120), allowNull: true },
        reviewerScore: {
          type: DataTypes.DECIMAL(4, 3),
          allowNull: true,
          get() {
            const raw = this.getDataValue('reviewerScore') as unknown;
            return raw === null || raw === undefined ? null : Number(raw);
          },
        },
        verified: { type: DataTypes.BOOLEAN, allowNull: true },
        body: { type: DataTypes.TEXT('medium'), allowNull: true },
        importBatchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'reviews' },
    );
  }
}
