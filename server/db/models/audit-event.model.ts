import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare actorUserId: number | null;
  declare actorEmail: string | null;
  declare action: string;
  declare targetType: string | null;
  declare targetId: string | null;
  declare details: Record<string, unknown> | null;
  declare ip: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    AuditEvent.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        actorUserId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        actorEmail: { type: DataTypes.STRING(254), allowNull: true },
        action: { type: DataTypes.STRING(60), allowNull: false },
        targetType: { type: DataTypes.STRING(40), allowNull: true },
        targetId: { type: DataTypes.STRING(80), allowNull: true },
        details: { type: DataTypes.JSON, allowNull: true },
        ip: { type: DataTypes.STRING(64), allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audit_events', updatedAt: false },
    );
  }
}
