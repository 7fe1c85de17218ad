import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ProduceKind } from '../../../shared/schemas/schedules.schema';

export class ReportSchedule extends Model<
  InferAttributes<ReportSchedule>,
  InferCreationAttributes<ReportSchedule>
> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare cron: string;
  declare timeZone: string;
  declare categoryIds: number[] | null;
  declare recipients: string[];
  declare produce: ProduceKind;
  declare enabled: CreationOptional<boolean>;
  declare lastDueAt: Date | null;
  declare createdBy: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    ReportSchedule.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        cron: { type: DataTypes.STRING(120), allowNull: false },
        timeZone: { type: DataTypes.STRING(64), allowNull: false },
        categoryIds: { type: DataTypes.JSON, allowNull: true },
        recipients: { type: DataTypes.JSON, allowNull: false },
        produce: { type: DataTypes.ENUM('snapshot', 'snapshot_digest', 'alerts'), allowNull: false },
        enabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        lastDueAt: { type: DataTypes.DATE, allowNull: true },
        createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'report_schedules' },
    );
  }
}
