import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

/**
 * Rank intervals (issue 19): per row the median rank, the interval's ends, the top-k share and the share
 * of draws in which the item listed above is truly ahead; per snapshot the seed, S and level that
 * reproduce them. Null on snapshots taken before this migration.
 */
export const up: Migration = async ({ context: qi }) => {
  const uint = () => ({ type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
  const dbl = () => ({ type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('snapshot_rows', 'rank_median', uint());
  await qi.addColumn('snapshot_rows', 'rank_low', uint());
  await qi.addColumn('snapshot_rows', 'rank_high', uint());
  await qi.addColumn('snapshot_rows', 'top_share', dbl());
  await qi.addColumn('snapshot_rows', 'above_ahead_share', dbl());
  await qi.addColumn('snapshots', 'rank_seed', uint());
  await qi.addColumn('snapshots', 'rank_draws', uint());
  await qi.addColumn('snapshots', 'rank_level', dbl());
  await qi.addColumn('snapshots', 'rank_top_k', uint());
};

export const down: Migration = async ({ context: qi }) => {
  for (const c of ['rank_median', 'rank_low', 'rank_high', 'top_share', 'above_ahead_share'])
    await qi.removeColumn('snapshot_rows', c);
  for (const c of ['rank_seed', 'rank_draws', 'rank_level', 'rank_top_k'])
    await qi.removeColumn('snapshots', c);
};
