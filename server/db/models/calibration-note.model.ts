import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class CalibrationNote extends Model<
  InferAttributes<CalibrationNote>,
  InferCreationAttributes<CalibrationNote>
> {
  declare id: CreationOptional<number>;
  declare categoryId: number;
  declare isoWeek: string;
  declare note: string;
  declare result: Record<string, unknown>;
  declare createdBy: number | null;
  declare createdByName: string;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    CalibrationNote.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        isoWeek: { type: DataTypes.CHAR(8), allowNull: false },
        note: { type: DataTypes.STRING(2000), allowNull: false },
        result: { type: DataTypes.JSON, allowNull: false },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdByName: { type: DataTypes.STRING(120), allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'calibration_notes', updatedAt: false },
    );
  }
}
