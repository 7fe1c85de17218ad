import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class ImportRowError extends Model<
  InferAttributes<ImportRowError>,
  InferCreationAttributes<ImportRowError>
> {
  declare id: CreationOptional<number>;
  declare batchId: number;
  declare line: number;
  declare columnName: string | null;
  declare reason: string;
  declare raw: string | null;

  static initModel(sequelize: Sequelize): void {
    ImportRowError.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        batchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        line: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        columnName: { type: DataTypes.STRING(60), allowNull: true },
        reason: { type: DataTypes.STRING(500), allowNull: false },
        raw: { type: DataTypes.TEXT, allowNull: true },
      },
      { sequelize, tableName: 'import_row_errors', timestamps: false },
    );
  }
}
