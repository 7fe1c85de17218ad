import {
  DataTypes,
  Model,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type SnapshotRowDetails = {
  sku: string;
  histogram: number[] | null;
  lowerBoundBasis: string;
  staleReason: string | null;
  clusterReason: string | null;
  clusterObserved: number | null;
  clusterExpected: number | null;
  clusterPValue: number | null;
  recurringPhrases: { phrase: string; count: number }[];
  mostHelpfulStars: number | null;
  mostHelpfulAt: string | null;
  newestAt: string | null;
  whatItTakes: string;
  aboveSku: string | null;
  aboveScore: number | null;
};

export class SnapshotRow extends Model<InferAttributes<SnapshotRow>, InferCreationAttributes<SnapshotRow>> {
  declare snapshotId: number;
  declare itemId: number;
  declare n: number;
  declare rawMean: number | null;
  declare smoothed: number;
  declare lowerBound: number;
  declare naiveRank: number;
  declare smoothedRank: number;
  declare drift: number;
  declare naiveMovement: number | null;
  declare smoothedMovement: number | null;
  declare newestAgeDays: number | null;
  declare medianAgeDays: number | null;
  declare recentShare: number | null;
  declare decayedMean: number | null;
  declare effectiveCount: number | null;
  declare helpfulMean: number | null;
  declare reviewerMean: number | null;
  declare oneStarShare: number | null;
  declare stale: boolean | null;
  declare thin: boolean;
  declare negativeCluster: boolean | null;
  declare reviewsToPass: number | null;
  declare details: SnapshotRowDetails;
  /** Rank interval of the smoothed rank (shared/scoring/rank-intervals.ts); null on older snapshots. */
  declare rankMedian: number | null;
  declare rankLow: number | null;
  declare rankHigh: number | null;
  declare topShare: number | null;
  declare aboveAheadShare: number | null;

  static initModel(sequelize: Sequelize): void {
    // A fresh object per attribute: Sequelize writes each attribute's column name into its definition,
    // so one shared object made every such attribute read the first one's column.
    const dbl = () => ({ type: DataTypes.DOUBLE, allowNull: true });
    SnapshotRow.init(
      {
        snapshotId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        itemId: { type: DataTypes.INTEGER.UNSIGNED, primaryKey: true },
        n: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        rawMean: dbl(),
        smoothed: { type: DataTypes.DOUBLE, allowNull: false },
        lowerBound: { type: DataTypes.DOUBLE, allowNull: false },
        naiveRank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        smoothedRank: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        drift: { type: DataTypes.INTEGER, allowNull: false },
        naiveMovement: { type: DataTypes.INTEGER, allowNull: true },
        smoothedMovement: { type: DataTypes.INTEGER, allowNull: true },
        newestAgeDays: dbl(),
        medianAgeDays: dbl(),
        recentShare: dbl(),
        decayedMean: dbl(),
        effectiveCount: dbl(),
        helpfulMean: dbl(),
        reviewerMean: dbl(),
        oneStarShare: dbl(),
        stale: { type: DataTypes.BOOLEAN, allowNull: true },
        thin: { type: DataTypes.BOOLEAN, allowNull: false },
        negativeCluster: { type: DataTypes.BOOLEAN, allowNull: true },
        // A whole number that can pass 2^53: see migrations/20261202230200-widen-reviews-to-pass.ts.
        reviewsToPass: dbl(),
        details: { type: DataTypes.JSON, allowNull: false },
        rankMedian: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rankLow: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        rankHigh: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        topShare: dbl(),
        aboveAheadShare: dbl(),
      },
      { sequelize, tableName: 'snapshot_rows', timestamps: false },
    );
  }
}
