import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';

export type ImportBatchStatus = 'queued' | 'running' | 'succeeded' | 'failed' | 'rejected';

export class ImportBatch extends Model<InferAttributes<ImportBatch>, InferCreationAttributes<ImportBatch>> {
  declare id: CreationOptional<number>;
  declare kind: 'reviews' | 'aggregates';
  declare source: 'upload' | 'api' | 'demo' | 'command';
  declare mode: 'all_or_nothing' | 'valid_rows';
  declare status: CreationOptional<ImportBatchStatus>;
  declare fileName: string | null;
  declare filePath: string | null;
  declare fileBytes: number | null;
  declare fileSha256: string | null;
  declare rowsRead: CreationOptional<number>;
  declare rowsAccepted: CreationOptional<number>;
  declare rowsRejected: CreationOptional<number>;
  declare rowsInserted: CreationOptional<number>;
  declare rowsUpdated: CreationOptional<number>;
  declare bytesDone: CreationOptional<number>;
  declare errorMessage: string | null;
  declare userId: number | null;
  declare tokenId: number | null;
  declare actorEmail: string | null;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;
  /** The server process running or about to run this import; null once it has ended. */
  declare leaseOwner: CreationOptional<string | null>;
  declare leaseUntil: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    // Spread at each use: Sequelize writes the column name into the attribute object it is given.
    const counter = { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 };
    ImportBatch.init(
      {
        id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.ENUM('reviews', 'aggregates'), allowNull: false },
        source: { type: DataTypes.ENUM('upload', 'api', 'demo', 'command'), allowNull: false },
        mode: { type: DataTypes.ENUM('all_or_nothing', 'valid_rows'), allowNull: false },
        status: {
          type: DataTypes.ENUM('queued', 'running', 'succeeded', 'failed', 'rejected'),
          allowNull: false,
          defaultValue: 'queued',
        },
        fileName: { type: DataTypes.STRING(255), allowNull: true },
        filePath: { type: DataTypes.STRING(500), allowNull: true },
        fileBytes: { type: DataTypes.BIGINT.UNSIGNED, allowNull: true },
        fileSha256: { type: DataTypes.CHAR(64), allowNull: true },
        rowsRead: { ...counter },
        rowsAccepted: { ...counter },
        rowsRejected: { ...counter },
        rowsInserted: { ...counter },
        rowsUpdated: { ...counter },
        bytesDone: { type: DataTypes.BIGINT.UNSIGNED, allowNull: false, defaultValue: 0 },
        errorMessage: { type: DataTypes.STRING(1000), allowNull: true },
        userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        tokenId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
        actorEmail: { type: DataTypes.STRING(254), allowNull: true },
        startedAt: { type: DataTypes.DATE, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        leaseOwner: { type: DataTypes.STRING(120), allowNull: true },
        leaseUntil: { type: DataTypes.DATE(3), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'import_batches' },
    );
  }
}
