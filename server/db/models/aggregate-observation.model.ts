import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export class AggregateObservation extends Model<
  InferAttributes<AggregateObservation>,
  InferCreationAttributes<AggregateObservation>
> {
  declare id: CreationOptional<number>;
  declare itemId: number;
  /** ISO date, YYYY-MM-DD. */
  declare observedOn: string;
  declare reviewCount: number;
  declare meanStars: number | null;
  declare stars1: number | null;
  declare stars2: number | null;
  declare stars3: number | null;
  declare stars4: number | null;
  declare stars5: number | null;
  declare newestReviewAt: Date | null;
  declare importBatchId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    const count = { type: DataTypes.INTEGER.UNSIGNED, allowNull: true };
    AggregateObservation.init(
      {
        id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
        itemId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        observedOn: { type: DataTypes.DATEONLY, allowNull: false },
        reviewCount: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
        meanStars: {
          type: DataTypes.DECIMAL(7, 5),
          allowNull: true,
          get() {
            const raw = this.getDataValue('meanStars') as unknown;
            return raw === null || raw === undefined ? null : Number(raw);
          },
        },
        stars1: { ...count, field: 'stars_1' },
        stars2: { ...count, field: 'stars_2' },
        stars3: { ...count, field: 'stars_3' },
        stars4: { ...count, field: 'stars_4' },
        stars5: { ...count, field: 'stars_5' },
        newestReviewAt: { type: DataTypes.DATE, allowNull: true },
        importBatchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'aggregate_observations' },
    );
  }
}
