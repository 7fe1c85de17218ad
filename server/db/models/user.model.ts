import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { RoleCode } from '../../../shared/auth';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare passwordHash: string;
  declare role: RoleCode;
  declare active: CreationOptional<boolean>;
  declare failedLogins: CreationOptional<number>;
  declare lockedUntil: Date | null;
  declare lastLoginAt: Date | null;
  /** Raised when credentials change; sessions signed in under an older value end. */
  declare credentialVersion: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    User.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        passwordHash: { type: DataTypes.STRING(100), allowNull: false },
        role: { type: DataTypes.STRING(20), allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        failedLogins: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        lockedUntil: { type: DataTypes.DATE, allowNull: true },
        lastLoginAt: { type: DataTypes.DATE, allowNull: true },
        credentialVersion: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'users' },
    );
  }
}
