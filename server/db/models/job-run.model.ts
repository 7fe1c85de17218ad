import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { JobKind, JobParams, JobStatus, JobTrigger } from '../../../shared/schemas/jobs.schema';

export class JobRun extends Model<InferAttributes<JobRun>, InferCreationAttributes<JobRun>> {
  declare id: CreationOptional<number>;
  declare scheduleId: number | null;
  declare kind: JobKind;
  declare categoryId: number | null;
  declare isoWeek: string | null;
  declare dueAt: Date | null;
  declare status: CreationOptional<JobStatus>;
  declare trigger: JobTrigger;
  declare params: JobParams | null;
  declare startedAt: CreationOptional<Date | null>;
  declare finishedAt: CreationOptional<Date | null>;
  declare durationMs: CreationOptional<number | null>;
  declare rows: CreationOptional<number | null>;
  declare log: CreationOptional<string | null>;
  declare error: CreationOptional<string | null>;
  declare attempt: CreationOptional<number>;
  declare retryOf: number | null;
  declare createdBy: string | null;
  declare heartbeatAt: Date | null;
  declare owner: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    JobRun.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        scheduleId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        kind: { type: DataTypes.ENUM('snapshot', 'backfill', 'digest', 'alerts'), allowNull: false },
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        isoWeek: { type: DataTypes.STRING(8), allowNull: true },
        dueAt: { type: DataTypes.DATE, allowNull: true },
        status: {
          type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed'),
          allowNull: false,
          defaultValue: 'queued',
        },
        trigger: { type: DataTypes.ENUM('schedule', 'catch_up', 'manual', 'retry'), allowNull: false },
        params: { type: DataTypes.JSON, allowNull: true },
        startedAt: { type: DataTypes.DATE(3), allowNull: true },
        finishedAt: { type: DataTypes.DATE(3), allowNull: true },
        durationMs: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rows: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        log: { type: DataTypes.TEXT, allowNull: true },
        error: { type: DataTypes.STRING(2000), allowNull: true },
        attempt: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
        retryOf: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdBy: { type: DataTypes.STRING(254), allowNull: true },
        heartbeatAt: { type: DataTypes.DATE(3), allowNull: true },
        owner: { type: DataTypes.STRING(120), allowNull: true },
        createdAt: DataTypes.DATE(3),
        updatedAt: DataTypes.DATE(3),
      },
      { sequelize, tableName: 'job_runs' },
    );
  }
}
