import { QueryTypes } from 'sequelize';
import { keyOf } from '../../../shared/keys';
import type { ResolvedParameters } from '../../../shared/scoring';
import { countOf } from '../../../shared/plural';
import { wilsonLowerBound } from '../../../shared/scoring';
import { evidenceBeforeSql } from '../../../shared/iso-week';
import type {
  DriftChart,
  Freshness,
  ItemDetail,
  PortfolioEntry,
  Standings,
  StandingsQuery,
  StandingsRow,
  StandingsSort,
  WeekSummary,
} from '../../../shared/schemas/standings.schema';
import {
  priorWeightApplied,
  priorWeightStrategyNames,
  rankWords,
  standingsColumns,
} from '../../../shared/vocabulary';
import { Category } from '../../db/models';
import type { SnapshotRowDetails } from '../../db/models/snapshot-row.model';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import type { CategoryRef } from '../categories/categories.service';
import { toCsvInSlices, type CsvColumn } from '../imports/csv-safe';

/** How many weeks of figures the portfolio's trend lines show. */
export const portfolioTrendWeeks = 12;

type SnapshotFigureRow = {
  id: number;
  category_id: number;
  iso_week: string;
  cutoff: Date;
  taken_at: Date;
  item_count: number;
  review_count: number;
  spearman_rho: number | null;
  kendall_tau_b: number | null;
  mean_abs_drift: number;
  stale_count: number;
  thin_count: number;
  cluster_count: number;
};

const figureColumns = `s.id, s.category_id, s.iso_week, s.cutoff, s.taken_at, s.item_count, s.review_count,
  s.spearman_rho, s.kendall_tau_b, s.mean_abs_drift, s.stale_count, s.thin_count, s.cluster_count`;

const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));

function weekSummary(r: SnapshotFigureRow): WeekSummary {
  const items = Number(r.item_count);
  return {
    isoWeek: r.iso_week,
    cutoff: new Date(r.cutoff).toISOString(),
    takenAt: new Date(r.taken_at).toISOString(),
    itemCount: items,
    reviewCount: Number(r.review_count),
    spearmanRho: numOrNull(r.spearman_rho),
    kendallTauB: numOrNull(r.kendall_tau_b),
    meanAbsDrift: Number(r.mean_abs_drift),
    staleShare: items > 0 ? Number(r.stale_count) / items : 0,
    thinShare: items > 0 ? Number(r.thin_count) / items : 0,
    clusterCount: Number(r.cluster_count),
  };
}

function parseDetails(raw: unknown): SnapshotRowDetails {
  return (typeof raw === 'string' ? JSON.parse(raw) : raw) as SnapshotRowDetails;
}

function parseParams(raw: unknown): ResolvedParameters {
  return (typeof raw === 'string' ? JSON.parse(raw) : raw) as ResolvedParameters;
}

/**
 * Every category the caller may see, with its latest week's figures and the weeks before it; with
 * `week`, as of that week (the digest mail of a past week links here).
 */
export async function getPortfolio(actor: Actor, week?: string): Promise<PortfolioEntry[]> {
  const categories = await Category.findAll({
    where: actor.categoryIds ? { id: actor.categoryIds } : {},
    attributes: ['id', 'slug', 'name', 'description'],
    order: [['name', 'ASC']],
  });
  if (categories.length === 0) return [];
  const rows = await db().query<SnapshotFigureRow>(
    `SELECT * FROM (
       SELECT ${figureColumns}, ROW_NUMBER() OVER (PARTITION BY s.category_id ORDER BY s.iso_week DESC) AS place
       FROM snapshots s WHERE s.category_id IN (:ids) ${week ? 'AND s.iso_week <= :week' : ''}
     ) s WHERE s.place <= :weeks ORDER BY s.category_id, s.iso_week`,
    {
      replacements: { ids: categories.map((c) => c.id), weeks: portfolioTrendWeeks, week: week ?? null },
      type: QueryTypes.SELECT,
    },
  );
  const byCategory = new Map<number, WeekSummary[]>();
  for (const r of rows) {
    const list = byCategory.get(Number(r.category_id)) ?? [];
    list.push(weekSummary(r));
    byCategory.set(Number(r.category_id), list);
  }
  return categories.map((c) => {
    const trend = byCategory.get(c.id) ?? [];
    return {
      slug: c.slug,
      name: c.name,
      description: c.description,
      latest: trend.at(-1) ?? null,
      trend,
    };
  });
}

/** The snapshot weeks of a category, newest first. */
export async function listWeeks(category: CategoryRef): Promise<WeekSummary[]> {
  const rows = await db().query<SnapshotFigureRow>(
    `SELECT ${figureColumns} FROM snapshots s WHERE s.category_id = :categoryId ORDER BY s.iso_week DESC`,
    { replacements: { categoryId: category.id }, type: QueryTypes.SELECT },
  );
  return rows.map(weekSummary);
}

export type WeekSnapshot = {
  id: number;
  summary: WeekSummary;
  cutoff: Date;
  params: ResolvedParameters;
  /** Level, S and seed of the week's rank intervals; null on weeks taken before they existed. */
  ranks: { level: number; draws: number; seed: number } | null;
};

/** The snapshot of the asked week, or the latest one; 404 when the category has none. */
export async function findWeek(category: CategoryRef, week?: string): Promise<WeekSnapshot> {
  const [row] = await db().query<
    SnapshotFigureRow & {
      params: unknown;
      rank_level: number | null;
      rank_draws: number | null;
      rank_seed: number | null;
    }
  >(
    `SELECT ${figureColumns}, s.params, s.rank_level, s.rank_draws, s.rank_seed FROM snapshots s WHERE s.category_id = :categoryId
     ${week ? 'AND s.iso_week = :week' : ''} ORDER BY s.iso_week DESC LIMIT 1`,
    { replacements: { categoryId: category.id, week: week ?? null }, type: QueryTypes.SELECT },
  );
  if (!row) {
    throw week
      ? AppError.notFound(`The snapshot of ${week} for ${category.name}`)
      : new AppError('not_found', `${category.name} has no weekly snapshot yet.`, 404);
  }
  return {
    id: Number(row.id),
    summary: weekSummary(row),
    cutoff: new Date(row.cutoff),
    params: parseParams(row.params),
    ranks:
      row.rank_level === null || row.rank_draws === null || row.rank_seed === null
        ? null
        : { level: Number(row.rank_level), draws: Number(row.rank_draws), seed: Number(row.rank_seed) },
  };
}

const sortSql: Record<StandingsSort, string> = {
  smoothedRank: 'sr.smoothed_rank',
  naiveRank: 'sr.naive_rank',
  drift: 'sr.drift',
  absDrift: 'ABS(sr.drift)',
  n: 'sr.n',
  rawMean: 'sr.raw_mean',
  smoothed: 'sr.smoothed',
  lowerBound: 'sr.lower_bound',
  newestAgeDays: 'sr.newest_age_days',
  smoothedMovement: 'sr.smoothed_movement',
  // How sure the rank is: the width of the 90 % rank range, narrowest first (then by smoothed rank).
  rankRange: '(sr.rank_high - sr.rank_low)',
  sku: 'i.sku',
  title: 'i.title',
};

const moverSql =
  '(ABS(COALESCE(sr.smoothed_movement, 0)) >= :moverThreshold OR ABS(COALESCE(sr.naive_movement, 0)) >= :moverThreshold)';

function escapeLike(text: string): string {
  return text.replace(/[\\%_]/g, '\\$&');
}

function standingsWhere(query: Omit<StandingsQuery, 'page' | 'pageSize' | 'sort' | 'dir'>) {
  const clauses = ['sr.snapshot_id = :snapshotId'];
  const replacements: Record<string, unknown> = {};
  const flags = new Set(query.flags ? query.flags.split(',') : []);
  if (flags.has('stale')) clauses.push('sr.stale = 1');
  if (flags.has('thin')) clauses.push('sr.thin = 1');
  if (flags.has('cluster')) clauses.push('sr.negative_cluster = 1');
  if (flags.has('mover')) clauses.push(moverSql);
  if (query.q) {
    // Searching is not identity: it stays blind to case and accents although sku compares exactly.
    clauses.push('(i.sku LIKE :q COLLATE utf8mb4_unicode_ci OR i.title LIKE :q)');
    replacements.q = `%${escapeLike(query.q)}%`;
  }
  if (query.driftMin !== undefined) {
    clauses.push('sr.drift >= :driftMin');
    replacements.driftMin = query.driftMin;
  }
  if (query.driftMax !== undefined) {
    clauses.push('sr.drift <= :driftMax');
    replacements.driftMax = query.driftMax;
  }
  return { where: clauses.join(' AND '), replacements };
}

type StandingsSqlRow = {
  sku: string;
  title: string;
  n: number;
  raw_mean: number | null;
  smoothed: number;
  lower_bound: number;
  naive_rank: number;
  smoothed_rank: number;
  drift: number;
  naive_movement: number | null;
  smoothed_movement: number | null;
  newest_age_days: number | null;
  recent_share: number | null;
  one_star_share: number | null;
  stale: number | null;
  thin: number;
  negative_cluster: number | null;
  mover: number;
  reviews_to_pass: number | null;
  details: unknown;
  rank_low: number | null;
  rank_median: number | null;
  rank_high: number | null;
  top_share: number | null;
  above_ahead_share: number | null;
};

const boolOrNull = (v: unknown): boolean | null =>
  v === null || v === undefined ? null : Boolean(Number(v));

function toStandingsRow(r: StandingsSqlRow): StandingsRow {
  const details = parseDetails(r.details);
  return {
    sku: r.sku,
    title: r.title,
    n: Number(r.n),
    rawMean: numOrNull(r.raw_mean),
    smoothed: Number(r.smoothed),
    lowerBound: Number(r.lower_bound),
    naiveRank: Number(r.naive_rank),
    smoothedRank: Number(r.smoothed_rank),
    drift: Number(r.drift),
    naiveMovement: numOrNull(r.naive_movement),
    smoothedMovement: numOrNull(r.smoothed_movement),
    newestAgeDays: numOrNull(r.newest_age_days),
    recentShare: numOrNull(r.recent_share),
    oneStarShare: numOrNull(r.one_star_share),
    stale: boolOrNull(r.stale),
    thin: Boolean(Number(r.thin)),
    negativeCluster: boolOrNull(r.negative_cluster),
    mover: Boolean(Number(r.mover)),
    staleReason: details.staleReason,
    clusterReason: details.clusterReason,
    reviewsToPass: numOrNull(r.reviews_to_pass),
    rankLow: numOrNull(r.rank_low),
    rankMedian: numOrNull(r.rank_median),
    rankHigh: numOrNull(r.rank_high),
    topShare: numOrNull(r.top_share),
    aboveAheadShare: numOrNull(r.above_ahead_share),
  };
}

async function selectStandings(
  snapshot: WeekSnapshot,
  query: StandingsQuery,
  limit: number | null,
): Promise<{ rows: StandingsRow[]; total: number }> {
  const { where, replacements } = standingsWhere(query);
  const base = {
    ...replacements,
    snapshotId: snapshot.id,
    moverThreshold: snapshot.params.moverThreshold,
  };
  const dir = query.dir === 'desc' ? 'DESC' : 'ASC';
  // The total of the filtered view comes with the page (one pass over the week's rows, not two).
  const rows = await db().query<StandingsSqlRow & { total_rows: number }>(
    `SELECT i.sku, i.title, sr.n, sr.raw_mean, sr.smoothed, sr.lower_bound, sr.naive_rank, sr.smoothed_rank, sr.drift,
       sr.naive_movement, sr.smoothed_movement, sr.newest_age_days, sr.recent_share, sr.one_star_share,
       sr.stale, sr.thin, sr.negative_cluster, ${moverSql} AS mover, sr.reviews_to_pass, sr.details,
       sr.rank_low, sr.rank_median, sr.rank_high, sr.top_share, sr.above_ahead_share,
       COUNT(*) OVER () AS total_rows
     FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE ${where}
     ORDER BY ${sortSql[query.sort]} ${dir}, sr.smoothed_rank ASC, i.sku ASC
     ${limit === null ? '' : 'LIMIT :limit OFFSET :offset'}`,
    {
      replacements: { ...base, limit, offset: limit === null ? 0 : (query.page - 1) * limit },
      type: QueryTypes.SELECT,
    },
  );
  let total = rows.length > 0 ? Number(rows[0]!.total_rows) : 0;
  if (rows.length === 0 && query.page > 1) {
    // A page past the end carries no rows to read the total from.
    const [count] = await db().query<{ total: number }>(
      `SELECT COUNT(*) AS total FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id WHERE ${where}`,
      { replacements: base, type: QueryTypes.SELECT },
    );
    total = Number(count?.total ?? 0);
  }
  return { rows: rows.map(toStandingsRow), total };
}

/** One page of a week's standings, sorted and filtered in SQL on whitelisted columns. */
export async function getStandings(category: CategoryRef, query: StandingsQuery): Promise<Standings> {
  const snapshot = await findWeek(category, query.week);
  const { rows, total } = await selectStandings(snapshot, query, query.pageSize);
  return {
    week: snapshot.summary,
    m: snapshot.params.m,
    priorWeightStrategy: snapshot.params.priorWeightStrategy,
    priorWeightApplied: snapshot.params.priorWeightApplied,
    C: snapshot.params.C,
    thinThreshold: snapshot.params.thinEvidenceThreshold,
    staleAfterDays: snapshot.params.staleAfterDays,
    moverThreshold: snapshot.params.moverThreshold,
    rankIntervals: snapshot.ranks,
    total,
    page: query.page,
    pageSize: query.pageSize,
    rows,
  };
}

const flagList = (r: StandingsRow) =>
  [r.stale ? 'stale' : '', r.thin ? 'thin' : '', r.negativeCluster ? 'cluster' : '', r.mover ? 'mover' : '']
    .filter(Boolean)
    .join(' ');

const w = standingsColumns;

/** A column of the standings export; `numeric` ones are numbers in the workbook (text in any CSV). */
export type ExportColumn<T> = CsvColumn<T> & { numeric?: boolean };

/** What an exported row is read against: the week, the category and the parameters of that week. */
export type ExportContext = { isoWeek: string; category: string; params: ResolvedParameters };

/**
 * The columns of every standings export (CSV and workbook), in order. The week, the category, C, m and the
 * strategy sit on every row so that a saved, filtered or pasted extract still says what it was.
 */
export const csvColumns = ({ isoWeek, category, params }: ExportContext): ExportColumn<StandingsRow>[] => [
  { header: w.isoWeek.csv, value: () => isoWeek },
  { header: w.category.csv, value: () => category },
  { header: w.smoothedRank.csv, value: 'smoothedRank', numeric: true },
  { header: w.naiveRank.csv, value: 'naiveRank', numeric: true },
  { header: w.drift.csv, value: 'drift', numeric: true },
  { header: w.sku.csv, value: 'sku' },
  { header: w.title.csv, value: 'title' },
  { header: w.n.csv, value: 'n', numeric: true },
  {
    header: w.rawMean.csv,
    value: (r) => (r.rawMean === null ? '' : r.rawMean.toFixed(4)),
    numeric: true,
  },
  { header: w.smoothed.csv, value: (r) => r.smoothed.toFixed(4), numeric: true },
  { header: w.lowerBound.csv, value: (r) => r.lowerBound.toFixed(4), numeric: true },
  {
    header: w.newestAgeDays.csv,
    value: (r) => (r.newestAgeDays === null ? '' : Math.floor(r.newestAgeDays)),
    numeric: true,
  },
  { header: w.smoothedMovement.csv, value: 'smoothedMovement', numeric: true },
  { header: w.flags.csv, value: flagList },
  { header: w.staleReason.csv, value: 'staleReason' },
  { header: w.clusterReason.csv, value: 'clusterReason' },
  { header: w.priorMean.csv, value: () => params.C.toFixed(4), numeric: true },
  { header: w.priorWeightStrategy.csv, value: () => priorWeightStrategyNames[params.priorWeightStrategy] },
  { header: w.priorWeight.csv, value: () => params.m.toFixed(4), numeric: true },
  { header: w.priorWeightApplied.csv, value: () => priorWeightApplied(params) },
  // Rank intervals: empty on weeks snapshotted before they existed.
  {
    header: w.rankRange.csv,
    value: (r) => (r.rankLow === null || r.rankHigh === null ? '' : rankWords.range(r.rankLow, r.rankHigh)),
  },
  { header: w.rankMedian.csv, value: 'rankMedian' },
  { header: w.rankLow.csv, value: 'rankLow' },
  { header: w.rankHigh.csv, value: 'rankHigh' },
  { header: w.topShare.csv, value: (r) => (r.topShare === null ? '' : r.topShare.toFixed(4)) },
  {
    header: w.aboveAheadShare.csv,
    value: (r) => (r.aboveAheadShare === null ? '' : r.aboveAheadShare.toFixed(4)),
  },
];

/** Every row of the filtered and sorted view with what the export columns need, and its file name. */
export async function standingsExport(
  category: CategoryRef,
  query: StandingsQuery,
  extension: 'csv' | 'xlsx',
): Promise<{ fileName: string; rows: StandingsRow[]; context: ExportContext; snapshot: WeekSnapshot }> {
  const snapshot = await findWeek(category, query.week);
  const { rows } = await selectStandings(snapshot, query, null);
  const filtered = query.flags || query.q || query.driftMin !== undefined || query.driftMax !== undefined;
  const fileName = `ballast-${category.slug}-${snapshot.summary.isoWeek}-standings${filtered ? '-filtered' : ''}.${extension}`;
  const context = { isoWeek: snapshot.summary.isoWeek, category: category.name, params: snapshot.params };
  return { fileName, rows, context, snapshot };
}

/** The whole filtered and sorted view (every page) as CSV, safe to open in a spreadsheet. */
export async function exportStandingsCsv(
  category: CategoryRef,
  query: StandingsQuery,
): Promise<{ fileName: string; csv: string }> {
  const { fileName, rows, context } = await standingsExport(category, query, 'csv');
  return { fileName, csv: await toCsvInSlices(rows, csvColumns(context), { bom: true }) };
}

/** Naive against smoothed rank for every item of the week, as parallel arrays. */
export async function getDriftChart(category: CategoryRef, week?: string): Promise<DriftChart> {
  const snapshot = await findWeek(category, week);
  const rows = await db().query<{
    sku: string;
    title: string;
    naive_rank: number;
    smoothed_rank: number;
    n: number;
  }>(
    `SELECT i.sku, i.title, sr.naive_rank, sr.smoothed_rank, sr.n FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = :snapshotId ORDER BY sr.smoothed_rank, i.sku`,
    { replacements: { snapshotId: snapshot.id }, type: QueryTypes.SELECT },
  );
  return {
    isoWeek: snapshot.summary.isoWeek,
    skus: rows.map((r) => r.sku),
    titles: rows.map((r) => r.title),
    naive: rows.map((r) => Number(r.naive_rank)),
    smoothed: rows.map((r) => Number(r.smoothed_rank)),
    n: rows.map((r) => Number(r.n)),
  };
}

const ageBuckets: { label: string; from: number; to: number | null }[] = [
  { label: 'Under 30 days', from: 0, to: 30 },
  { label: '30–90 days', from: 30, to: 90 },
  { label: '90–180 days', from: 90, to: 180 },
  { label: '180–365 days', from: 180, to: 365 },
  { label: '1–2 years', from: 365, to: 730 },
  { label: 'Over 2 years', from: 730, to: null },
];

/** How old each item's newest review is, in buckets, and the stale items oldest first. */
export async function getFreshness(category: CategoryRef, week?: string, limit = 100): Promise<Freshness> {
  const snapshot = await findWeek(category, week);
  const replacements: Record<string, unknown> = { snapshotId: snapshot.id, limit };
  const sums = ageBuckets
    .map((b, k) => {
      replacements[`f${k}`] = b.from;
      if (b.to !== null) replacements[`t${k}`] = b.to;
      return `SUM(sr.newest_age_days >= :f${k}${b.to === null ? '' : ` AND sr.newest_age_days < :t${k}`}) AS b${k}`;
    })
    .join(', ');
  const [counts] = await db().query<Record<string, number | null>>(
    `SELECT ${sums}, SUM(sr.newest_age_days IS NULL) AS unknown_age, SUM(sr.stale = 1) AS stale_total
     FROM snapshot_rows sr WHERE sr.snapshot_id = :snapshotId`,
    { replacements, type: QueryTypes.SELECT },
  );
  const stale = await db().query<{
    sku: string;
    title: string;
    n: number;
    smoothed_rank: number;
    newest_age_days: number | null;
    details: unknown;
  }>(
    `SELECT i.sku, i.title, sr.n, sr.smoothed_rank, sr.newest_age_days, sr.details
     FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = :snapshotId AND sr.stale = 1
     ORDER BY sr.newest_age_days DESC, i.sku LIMIT :limit`,
    { replacements, type: QueryTypes.SELECT },
  );
  return {
    isoWeek: snapshot.summary.isoWeek,
    staleAfterDays: snapshot.params.staleAfterDays,
    buckets: ageBuckets.map((b, k) => ({ ...b, count: Number(counts?.[`b${k}`] ?? 0) })),
    unknownAge: Number(counts?.unknown_age ?? 0),
    staleTotal: Number(counts?.stale_total ?? 0),
    stale: stale.map((r) => ({
      sku: r.sku,
      title: r.title,
      n: Number(r.n),
      smoothedRank: Number(r.smoothed_rank),
      newestAgeDays: numOrNull(r.newest_age_days),
      newestAt: parseDetails(r.details).newestAt,
    })),
  };
}

type TimelineSqlRow = {
  rank_low: number | null;
  rank_high: number | null;
  rank_level: number | null;
  snapshot_id: number;
  iso_week: string;
  cutoff: Date;
  item_count: number;
  params: unknown;
  n: number | null;
  raw_mean: number | null;
  smoothed: number | null;
  lower_bound: number | null;
  naive_rank: number | null;
  smoothed_rank: number | null;
  drift: number | null;
  naive_movement: number | null;
  smoothed_movement: number | null;
  newest_age_days: number | null;
  median_age_days: number | null;
  recent_share: number | null;
  decayed_mean: number | null;
  effective_count: number | null;
  helpful_mean: number | null;
  one_star_share: number | null;
  stale: number | null;
  thin: number | null;
  negative_cluster: number | null;
  reviews_to_pass: number | null;
  details: unknown;
};

const capitalised = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** "Moved up 3 places smoothed", "Held its place naive": a zero move is not a move up. */
function movedPhrase(movement: number, ranking: 'smoothed' | 'naive'): string {
  if (movement === 0) return `held its place ${ranking}`;
  return `moved ${movement > 0 ? 'up' : 'down'} ${countOf(Math.abs(movement), 'place')} ${ranking}`;
}

function flagsOf(row: TimelineSqlRow, details: SnapshotRowDetails, params: ResolvedParameters) {
  const n = Number(row.n);
  const movement = Math.max(
    Math.abs(Number(row.smoothed_movement ?? 0)),
    Math.abs(Number(row.naive_movement ?? 0)),
  );
  const stale = Boolean(Number(row.stale));
  const thin = Boolean(Number(row.thin));
  const cluster = Boolean(Number(row.negative_cluster));
  const phrases = details.recurringPhrases.map((p) => `“${p.phrase}” ×${p.count}`).join(', ');
  return [
    {
      flag: 'stale' as const,
      on: stale,
      reason: stale
        ? `${details.staleReason ?? 'Newest review is old'}; the category treats ${params.staleAfterDays} days as stale.`
        : (details.staleReason ?? `Newest review is within ${params.staleAfterDays} days.`),
    },
    {
      flag: 'thin' as const,
      on: thin,
      reason: thin
        ? `${countOf(n, 'review')}, below the thin-evidence threshold of ${params.thinEvidenceThreshold.toFixed(1)}.`
        : `${countOf(n, 'review')}, at or above the thin-evidence threshold of ${params.thinEvidenceThreshold.toFixed(1)}.`,
    },
    {
      flag: 'cluster' as const,
      on: cluster,
      reason: cluster
        ? `${details.clusterReason ?? 'More one-star reviews than the item’s baseline'}${phrases ? `; recurring: ${phrases}` : ''}.`
        : (details.clusterReason ?? 'No unusual run of one-star reviews.'),
    },
    {
      flag: 'mover' as const,
      on: movement >= params.moverThreshold,
      reason:
        row.smoothed_movement === null
          ? 'No earlier week to compare with.'
          : `${capitalised(movedPhrase(Number(row.smoothed_movement), 'smoothed'))} and ${movedPhrase(Number(row.naive_movement ?? 0), 'naive')} since the week before (mover threshold ${countOf(params.moverThreshold, 'place')}).`,
    },
  ];
}

/** Everything the item screen shows: rank timeline over all weeks and the chosen week's evidence. */
export async function getItemDetail(
  category: CategoryRef,
  rawSku: string,
  week?: string,
): Promise<ItemDetail> {
  const sku = keyOf(rawSku);
  const [item] = await db().query<{ id: number; sku: string; title: string }>(
    'SELECT id, sku, title FROM items WHERE category_id = :categoryId AND sku = :sku',
    { replacements: { categoryId: category.id, sku }, type: QueryTypes.SELECT },
  );
  if (!item) throw AppError.notFound(`The item ${sku}`);
  const rows = await db().query<TimelineSqlRow>(
    `SELECT s.id AS snapshot_id, s.iso_week, s.cutoff, s.item_count, s.params, sr.n, sr.raw_mean, sr.smoothed, sr.lower_bound,
       sr.naive_rank, sr.smoothed_rank, sr.drift, sr.naive_movement, sr.smoothed_movement, sr.newest_age_days,
       sr.median_age_days, sr.recent_share, sr.decayed_mean, sr.effective_count, sr.helpful_mean, sr.one_star_share,
       sr.stale, sr.thin, sr.negative_cluster, sr.reviews_to_pass, sr.details,
       sr.rank_low, sr.rank_high, s.rank_level
     FROM snapshots s LEFT JOIN snapshot_rows sr ON sr.snapshot_id = s.id AND sr.item_id = :itemId
     WHERE s.category_id = :categoryId ORDER BY s.iso_week`,
    { replacements: { itemId: item.id, categoryId: category.id }, type: QueryTypes.SELECT },
  );
  // The charts start at the item's first week in a snapshot, not at the category's first week.
  const first = rows.findIndex((r) => r.n !== null);
  const timeline = (first < 0 ? [] : rows.slice(first)).map((r) => ({
    isoWeek: r.iso_week,
    cutoff: new Date(r.cutoff).toISOString(),
    itemCount: Number(r.item_count),
    naiveRank: numOrNull(r.naive_rank),
    smoothedRank: numOrNull(r.smoothed_rank),
    n: numOrNull(r.n),
    rawMean: numOrNull(r.raw_mean),
    smoothed: numOrNull(r.smoothed),
    lowerBound: numOrNull(r.lower_bound),
    decayedMean: numOrNull(r.decayed_mean),
    helpfulMean: numOrNull(r.helpful_mean),
    rankLow: numOrNull(r.rank_low),
    rankHigh: numOrNull(r.rank_high),
    rankLevel: numOrNull(r.rank_level),
  }));
  const present = rows.filter((r) => r.n !== null);
  const chosen = week ? present.find((r) => r.iso_week === week) : present.at(-1);
  if (week && !chosen) throw AppError.notFound(`${sku} in the snapshot of ${week}`);

  let current: ItemDetail['current'] = null;
  let helpfulReviews: ItemDetail['helpfulReviews'] = [];
  if (chosen) {
    const params = parseParams(chosen.params);
    const details = parseDetails(chosen.details);
    const n = Number(chosen.n);
    const rawMean = numOrNull(chosen.raw_mean);
    const sumStars = details.histogram
      ? details.histogram.reduce((s, c, k) => s + c * (k + 1), 0)
      : n * (rawMean ?? 0);
    let above: NonNullable<ItemDetail['current']>['above'] = null;
    if (details.aboveSku !== null && details.aboveScore !== null) {
      const [aboveItem] = await db().query<{ title: string }>(
        'SELECT title FROM items WHERE category_id = :categoryId AND sku = :sku',
        { replacements: { categoryId: category.id, sku: details.aboveSku }, type: QueryTypes.SELECT },
      );
      above = { sku: details.aboveSku, title: aboveItem?.title ?? null, smoothed: details.aboveScore };
    }
    current = {
      n,
      sumStars,
      rawMean,
      smoothed: Number(chosen.smoothed),
      lowerBound: Number(chosen.lower_bound),
      naiveRank: Number(chosen.naive_rank),
      smoothedRank: Number(chosen.smoothed_rank),
      drift: Number(chosen.drift),
      itemCount: Number(chosen.item_count),
      histogram: details.histogram,
      newestAt: details.newestAt,
      newestAgeDays: numOrNull(chosen.newest_age_days),
      medianAgeDays: numOrNull(chosen.median_age_days),
      recentShare: numOrNull(chosen.recent_share),
      decayedMean: numOrNull(chosen.decayed_mean),
      effectiveCount: numOrNull(chosen.effective_count),
      helpfulMean: numOrNull(chosen.helpful_mean),
      oneStarShare: numOrNull(chosen.one_star_share),
      flags: flagsOf(chosen, details, params),
      recurringPhrases: details.recurringPhrases,
      m: params.m,
      priorWeightStrategy: params.priorWeightStrategy,
      priorWeightApplied: params.priorWeightApplied,
      C: params.C,
      halfLifeDays: params.halfLifeDays,
      whatItTakesStars: params.whatItTakesStars,
      above,
      reviewsToPass: numOrNull(chosen.reviews_to_pass),
    };

    // Review text and votes only: reviewer identifiers never leave the server (DESIGN §7).
    const reviews = await db().query<{
      stars: number;
      reviewed_at: Date;
      helpful_yes: number;
      helpful_no: number;
      verified: number | null;
      body: string | null;
    }>(
      `SELECT stars, reviewed_at, helpful_yes, helpful_no, verified, body FROM reviews
       WHERE item_id = :itemId AND ${evidenceBeforeSql('reviewed_at')} AND helpful_yes > 0`,
      { replacements: { itemId: item.id, cutoff: new Date(chosen.cutoff) }, type: QueryTypes.SELECT },
    );
    helpfulReviews = reviews
      .map((r) => ({
        weight: wilsonLowerBound(
          Number(r.helpful_yes),
          Number(r.helpful_yes) + Number(r.helpful_no),
          params.helpfulZ,
        ),
        at: new Date(r.reviewed_at),
        r,
      }))
      .sort((a, b) => b.weight - a.weight || b.at.getTime() - a.at.getTime())
      .slice(0, 3)
      .map(({ r, at }) => ({
        stars: Number(r.stars),
        reviewedAt: at.toISOString(),
        helpfulYes: Number(r.helpful_yes),
        helpfulNo: Number(r.helpful_no),
        verified: boolOrNull(r.verified),
        body: r.body,
      }));
  }
  return {
    sku: item.sku,
    title: item.title,
    category: { slug: category.slug, name: category.name },
    isoWeek: chosen?.iso_week ?? null,
    timeline,
    current,
    helpfulReviews,
  };
}
