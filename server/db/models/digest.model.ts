import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { DigestKind, DigestSummary, PaperSize } from '../../../shared/schemas/digests.schema';

export class Digest extends Model<InferAttributes<Digest>, InferCreationAttributes<Digest>> {
  declare id: CreationOptional<number>;
  declare kind: DigestKind;
  /** 0 for the portfolio digest. */
  declare categoryId: number;
  declare isoWeek: string;
  declare paper: PaperSize;
  declare pdf: Buffer;
  declare sha256: string;
  declare sizeBytes: number;
  declare pageCount: number;
  declare summary: DigestSummary;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Digest.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.ENUM('category', 'portfolio'), allowNull: false },
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
        isoWeek: { type: DataTypes.CHAR(8), allowNull: false },
        paper: { type: DataTypes.ENUM('A4', 'LETTER'), allowNull: false },
        pdf: { type: DataTypes.BLOB('long'), allowNull: false },
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        sizeBytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        pageCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        summary: { type: DataTypes.JSON, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'digests', updatedAt: false },
    );
  }
}
