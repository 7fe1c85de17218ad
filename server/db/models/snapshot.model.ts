import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { CategoryFigures, ResolvedParameters } from '../../../shared/scoring';

export class Snapshot extends Model<InferAttributes<Snapshot>, InferCreationAttributes<Snapshot>> {
  declare id: CreationOptional<number>;
  declare categoryId: number;
  declare isoWeek: string;
  declare cutoff: Date;
  declare takenAt: Date;
  declare itemCount: number;
  declare reviewCount: number;
  declare spearmanRho: number | null;
  declare kendallTauB: number | null;
  declare meanAbsDrift: number;
  declare maxAbsDrift: number;
  declare staleCount: number;
  declare thinCount: number;
  declare clusterCount: number;
  declare params: ResolvedParameters;
  declare figures: CategoryFigures;
  /** Rank intervals: seed, draws S, level and top k that reproduce them; null before they existed. */
  declare rankSeed: number | null;
  declare rankDraws: number | null;
  declare rankLevel: number | null;
  declare rankTopK: number | null;

  static initModel(sequelize: Sequelize): void {
    Snapshot.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        categoryId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        isoWeek: { type: DataTypes.CHAR(8), allowNull: false },
        cutoff: { type: DataTypes.DATE, allowNull: false },
        takenAt: { type: DataTypes.DATE, allowNull: false },
        itemCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        reviewCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        spearmanRho: { type: DataTypes.DOUBLE, allowNull: true },
        kendallTauB: { type: DataTypes.DOUBLE, allowNull: true },
        meanAbsDrift: { type: DataTypes.DOUBLE, allowNull: false },
        maxAbsDrift: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        staleCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        thinCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        clusterCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        params: { type: DataTypes.JSON, allowNull: false },
        figures: { type: DataTypes.JSON, allowNull: false },
        rankSeed: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rankDraws: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rankLevel: { type: DataTypes.DOUBLE, allowNull: true },
        rankTopK: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      },
      { sequelize, tableName: 'snapshots', timestamps: false },
    );
  }
}
