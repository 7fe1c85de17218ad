import { createHash } from 'node:crypto';
import { QueryTypes, UniqueConstraintError } from 'sequelize';
import {
  weekCutoff,
  isoWeekLabel,
  isoWeekRange,
  isoWeekStart,
  isIsoWeekLabel,
  lastCompletedIsoWeek,
} from '../../../shared/iso-week';
import {
  defaultRankIntervalOptions,
  resolveSettings,
  ScoringInputError,
  type ItemResult,
  type PreviousRankingEntry,
  type ScoringSettings,
} from '../../../shared/scoring';
import { inUserWords } from '../../../shared/vocabulary';
import { Category, Snapshot } from '../../db/models';
import type { SnapshotRowDetails } from '../../db/models/snapshot-row.model';
import { db } from '../../db/sequelize';
import { AppError } from '../../lib/app-error';
import { runInWorker } from '../../workers/pool';
import type { SnapshotScore } from '../../workers/tasks';
import { evidenceArrived } from '../alerts/alert-events';
import { loadCategoryEvidence } from './snapshot-evidence';

export type SnapshotOutcome = {
  snapshotId: number;
  categoryId: number;
  isoWeek: string;
  rows: number;
  replaced: boolean;
};

export type TakeSnapshotOptions = {
  categoryId: number;
  /** '2026-W48'; by default the latest week that has ended at `now`. */
  isoWeek?: string;
  now?: Date;
  /** Replace an existing snapshot of that week instead of refusing. */
  replace?: boolean;
  log?: (line: string) => void;
};

/** A category's stored settings over the defaults; a bad stored value fails loudly rather than silently. */
export function categorySettings(stored: Record<string, unknown> | null | undefined): ScoringSettings {
  try {
    return resolveSettings((stored ?? {}) as Partial<ScoringSettings>);
  } catch (err) {
    if (err instanceof ScoringInputError) {
      throw new AppError(
        'bad_request',
        `The category's scoring settings are not valid: ${inUserWords(err.path, err.reason)}`,
        400,
      );
    }
    throw err;
  }
}

async function previousRanking(categoryId: number, isoWeek: string): Promise<PreviousRankingEntry[] | null> {
  const rows = await db().query<{ sku: string; naive_rank: number; smoothed_rank: number }>(
    `SELECT i.sku, sr.naive_rank, sr.smoothed_rank
     FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = (SELECT id FROM snapshots WHERE category_id = :categoryId AND iso_week < :isoWeek
                             ORDER BY iso_week DESC LIMIT 1)`,
    { replacements: { categoryId, isoWeek }, type: QueryTypes.SELECT },
  );
  if (rows.length === 0) return null;
  return rows.map((r) => ({
    sku: r.sku,
    naiveRank: Number(r.naive_rank),
    smoothedRank: Number(r.smoothed_rank),
  }));
}

function rowDetails(
  r: ItemResult,
  histogram: readonly number[] | null,
  newestAt: string | null,
): SnapshotRowDetails {
  return {
    sku: r.sku,
    histogram: histogram ? [...histogram] : null,
    lowerBoundBasis: r.lowerBoundBasis,
    staleReason: r.staleReason,
    clusterReason: r.clusterReason,
    clusterObserved: r.clusterObserved,
    clusterExpected: r.clusterExpected,
    clusterPValue: r.clusterPValue,
    recurringPhrases: r.recurringPhrases,
    mostHelpfulStars: r.mostHelpfulStars,
    mostHelpfulAt: r.mostHelpfulAt,
    newestAt,
    whatItTakes: r.whatItTakes,
    aboveSku: r.aboveSku,
    aboveScore: r.aboveScore,
  };
}

const rowColumns = [
  'snapshot_id',
  'item_id',
  'n',
  'raw_mean',
  'smoothed',
  'lower_bound',
  'naive_rank',
  'smoothed_rank',
  'drift',
  'naive_movement',
  'smoothed_movement',
  'newest_age_days',
  'median_age_days',
  'recent_share',
  'decayed_mean',
  'effective_count',
  'helpful_mean',
  'reviewer_mean',
  'one_star_share',
  'stale',
  'thin',
  'negative_cluster',
  'reviews_to_pass',
  'details',
  'rank_median',
  'rank_low',
  'rank_high',
  'top_share',
  'above_ahead_share',
];

/**
 * The rank sampler's seed for a category and week: the same week of the same category always draws the
 * same stream, so a replaced snapshot reproduces its intervals exactly when the evidence has not changed.
 */
export function rankSeed(categoryId: number, isoWeek: string): number {
  return createHash('sha256').update(`ballast-ranks/${categoryId}/${isoWeek}`).digest().readUInt32BE(0);
}

/**
 * Takes the snapshot of one category for one ISO week, as of the week's cut-off (Monday 00:00 UTC after
 * it, or now for the running week): SQL aggregates, the shared engine, and one transaction that writes the
 * snapshot, its rows and the exact parameters used. A second snapshot of the same week is refused by a
 * unique key unless `replace` is asked for.
 */
export async function takeSnapshot(options: TakeSnapshotOptions): Promise<SnapshotOutcome> {
  const now = options.now ?? new Date();
  const log = options.log ?? (() => {});
  const isoWeek = options.isoWeek ?? lastCompletedIsoWeek(now);
  if (!isIsoWeekLabel(isoWeek))
    throw new AppError('bad_request', `"${isoWeek}" is not an ISO week such as 2026-W48.`, 400);
  if (isoWeekStart(isoWeek) > now) throw new AppError('bad_request', `${isoWeek} has not started yet.`, 400);
  const cutoff = new Date(Math.min(weekCutoff(isoWeek).getTime(), now.getTime()));

  const category = await Category.findByPk(options.categoryId);
  if (!category) throw AppError.notFound('The category');
  const settings = categorySettings(category.settings);

  const existing = await Snapshot.findOne({
    where: { categoryId: category.id, isoWeek },
    attributes: ['id'],
  });
  if (existing && !options.replace) {
    throw new AppError(
      'conflict',
      `${category.name} already has a snapshot for ${isoWeek}. Run again with replace to recompute it.`,
      409,
    );
  }

  const evidence = await loadCategoryEvidence(category.id, cutoff, settings);
  if (evidence.items.length === 0) {
    throw new AppError('bad_request', `${category.name} has no ratings before ${cutoff.toISOString()}.`, 400);
  }
  const previous = await previousRanking(category.id, isoWeek);
  const seed = rankSeed(category.id, isoWeek);
  const { result, intervals } = await runInWorker<SnapshotScore>({
    kind: 'snapshot-score',
    items: evidence.items,
    settings,
    asOf: cutoff.toISOString(),
    previous,
    ranks: { ...defaultRankIntervalOptions, seed },
  });
  log(
    `${category.slug} ${isoWeek}: ${result.items.length} items, m=${result.resolved.m.toFixed(2)}, C=${result.resolved.C.toFixed(3)}`,
  );

  const itemIdBySku = new Map(evidence.items.map((item, i) => [item.sku, evidence.itemIds[i]!]));
  const summaryBySku = new Map(evidence.items.map((item) => [item.sku, item]));
  const f = result.category;
  try {
    const snapshotId = await db().transaction(async (transaction) => {
      if (existing) await Snapshot.destroy({ where: { id: existing.id }, transaction });
      const snapshot = await Snapshot.create(
        {
          categoryId: category.id,
          isoWeek,
          cutoff,
          takenAt: now,
          itemCount: f.itemCount,
          reviewCount: f.reviewCount,
          spearmanRho: f.spearmanRho,
          kendallTauB: f.kendallTauB,
          meanAbsDrift: f.meanAbsDrift,
          maxAbsDrift: f.maxAbsDrift,
          staleCount: f.staleCount,
          thinCount: f.thinCount,
          clusterCount: f.negativeClusterCount,
          params: result.resolved,
          figures: f,
          rankSeed: intervals.seed,
          rankDraws: intervals.draws,
          rankLevel: intervals.level,
          rankTopK: intervals.topK,
        },
        { transaction },
      );
      for (let start = 0; start < result.items.length; start += 1000) {
        const chunk = result.items.slice(start, start + 1000);
        const values: unknown[] = [];
        for (let k = 0; k < chunk.length; k++) {
          const r = chunk[k]!;
          const at = start + k;
          const ahead = intervals.aboveAheadShare[at]!;
          const summary = summaryBySku.get(r.sku)!;
          values.push(
            snapshot.id,
            itemIdBySku.get(r.sku),
            r.n,
            r.rawMean,
            r.smoothed,
            r.lowerBound,
            r.naiveRank,
            r.smoothedRank,
            r.drift,
            r.naiveMovement,
            r.smoothedMovement,
            r.newestAgeDays,
            r.medianAgeDays,
            r.recentShare,
            r.decayedMean,
            r.effectiveCount,
            r.helpfulWeightedMean,
            r.reviewerWeightedMean,
            r.oneStarShare,
            r.stale,
            r.thin,
            r.negativeCluster,
            r.reviewsToPass,
            JSON.stringify(rowDetails(r, summary.histogram, summary.newestAt)),
            intervals.medianRank[at],
            intervals.lowerRank[at],
            intervals.upperRank[at],
            intervals.topShare[at],
            Number.isNaN(ahead) ? null : ahead,
          );
        }
        const placeholders = chunk.map(() => `(${rowColumns.map(() => '?').join(',')})`).join(',');
        await db().query(`INSERT INTO snapshot_rows (${rowColumns.join(',')}) VALUES ${placeholders}`, {
          replacements: values,
          transaction,
        });
      }
      return snapshot.id;
    });
    if (existing) log(`${category.slug} ${isoWeek}: replaced the earlier snapshot`);
    evidenceArrived({ source: 'snapshot', snapshotId, categoryId: category.id });
    return {
      snapshotId,
      categoryId: category.id,
      isoWeek,
      rows: result.items.length,
      replaced: Boolean(existing),
    };
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw new AppError(
        'conflict',
        `${category.name} got a snapshot for ${isoWeek} from another run just now.`,
        409,
      );
    }
    throw err;
  }
}

export type BackfillOptions = {
  categoryId: number;
  fromWeek?: string;
  toWeek?: string;
  now?: Date;
  replace?: boolean;
  log?: (line: string) => void;
  onProgress?: (done: number, total: number) => void;
};

/** The first ISO week in which a category has any rating, or null when it has none. */
export async function firstWeekWithData(categoryId: number): Promise<string | null> {
  const [row] = await db().query<{ first: Date | null }>(
    `SELECT LEAST(
       COALESCE((SELECT MIN(r.reviewed_at) FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.category_id = :categoryId), '9999-12-31'),
       COALESCE((SELECT MIN(a.observed_on) FROM aggregate_observations a JOIN items i ON i.id = a.item_id WHERE i.category_id = :categoryId), '9999-12-31')
     ) AS first`,
    { replacements: { categoryId }, type: QueryTypes.SELECT },
  );
  const first = row?.first ? new Date(row.first) : null;
  if (!first || first.getUTCFullYear() >= 9999) return null;
  return isoWeekLabel(first);
}

/**
 * Computes the weekly snapshots of past weeks from imported history, oldest first so each week's
 * movement compares with the week before. Weeks that already have a snapshot are kept unless `replace`.
 */
export async function backfillSnapshots(options: BackfillOptions): Promise<SnapshotOutcome[]> {
  const now = options.now ?? new Date();
  const log = options.log ?? (() => {});
  const from = options.fromWeek ?? (await firstWeekWithData(options.categoryId));
  const to = options.toWeek ?? lastCompletedIsoWeek(now);
  if (!from) {
    log('No ratings yet: nothing to backfill.');
    return [];
  }
  for (const week of [from, to]) {
    if (!isIsoWeekLabel(week))
      throw new AppError('bad_request', `"${week}" is not an ISO week such as 2026-W48.`, 400);
  }
  const weeks = from <= to ? isoWeekRange(from, to) : [];
  const existing = new Set(
    (await Snapshot.findAll({ where: { categoryId: options.categoryId }, attributes: ['isoWeek'] })).map(
      (s) => s.isoWeek,
    ),
  );
  const outcomes: SnapshotOutcome[] = [];
  let done = 0;
  for (const week of weeks) {
    if (existing.has(week) && !options.replace) {
      done += 1;
      options.onProgress?.(done, weeks.length);
      continue;
    }
    outcomes.push(
      await takeSnapshot({
        categoryId: options.categoryId,
        isoWeek: week,
        now,
        replace: options.replace,
        log,
      }),
    );
    done += 1;
    options.onProgress?.(done, weeks.length);
  }
  return outcomes;
}
