import {
  DataTypes,
  Model,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { RoleCode } from '../../../shared/auth';

export class Role extends Model<InferAttributes<Role>, InferCreationAttributes<Role>> {
  declare code: RoleCode;
  declare label: string;
  declare description: string;

  static initModel(sequelize: Sequelize): void {
    Role.init(
      {
        code: { type: DataTypes.STRING(20), primaryKey: true },
        label: { type: DataTypes.STRING(60), allowNull: false },
        description: { type: DataTypes.STRING(255), allowNull: false },
      },
      { sequelize, tableName: 'roles', timestamps: false },
    );
  }
}
