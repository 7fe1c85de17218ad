import { createHash } from 'node:crypto';
import { Op, QueryTypes } from 'sequelize';
import { isoWeekEnd, isoWeekStart } from '../../../shared/iso-week';
import type {
  CategoryDigestData,
  DigestItem,
  DigestKind,
  DigestPreviousWeek,
  DigestRecord,
  DigestSummary,
  PaperSize,
  PortfolioDigestData,
  ProduceDigestsResult,
} from '../../../shared/schemas/digests.schema';
import { countOf } from '../../../shared/plural';
import type { CategoryFigures, ResolvedParameters } from '../../../shared/scoring';
import { loadConfig } from '../../config/env';
import { Category, Digest, JobRun, MailDelivery, ReportSchedule, Snapshot } from '../../db/models';
import { db } from '../../db/sequelize';
import { AppError } from '../../lib/app-error';
import { queueDeliveries } from '../mail/deliveries.service';
import {
  categoryRecipients,
  categoryTarget,
  portfolioRecipients,
  portfolioTarget,
} from '../subscriptions/subscriptions.service';
import { runInWorker } from '../../workers/pool';
import type { DigestTask, RenderedDigest } from '../../workers/tasks';
import { buildStory, keyFigures } from './digest-story';

function json<T>(value: unknown): T {
  return (typeof value === 'string' ? JSON.parse(value) : value) as T;
}

const day = (d: Date): string => d.toISOString().slice(0, 10);

export function weekUrl(slug: string, isoWeek: string, publicUrl = loadConfig().publicUrl): string {
  return `${publicUrl.replace(/\/$/, '')}/categories/${encodeURIComponent(slug)}?week=${encodeURIComponent(isoWeek)}`;
}

export function digestFileName(kind: DigestKind, slug: string | null, isoWeek: string): string {
  return kind === 'portfolio'
    ? `ballast-portfolio-${isoWeek}.pdf`
    : `ballast-${slug ?? 'category'}-${isoWeek}.pdf`;
}

type RowRecord = {
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
  median_age_days: number | null;
  recent_share: number | null;
  one_star_share: number | null;
  stale: number | boolean | null;
  thin: number | boolean;
  negative_cluster: number | boolean | null;
  reviews_to_pass: number | null;
  details: unknown;
  rank_low: number | null;
  rank_median: number | null;
  rank_high: number | null;
};

type Details = {
  staleReason: string | null;
  clusterReason: string | null;
  clusterObserved: number | null;
  clusterExpected: number | null;
  clusterPValue: number | null;
  recurringPhrases: { phrase: string; count: number }[] | null;
  whatItTakes: string;
  aboveSku: string | null;
  aboveScore: number | null;
};

async function snapshotItems(snapshotId: number): Promise<DigestItem[]> {
  const rows = await db().query<RowRecord>(
    `SELECT i.sku, i.title, sr.n, sr.raw_mean, sr.smoothed, sr.lower_bound, sr.naive_rank, sr.smoothed_rank,
            sr.drift, sr.naive_movement, sr.smoothed_movement, sr.newest_age_days, sr.median_age_days,
            sr.recent_share, sr.one_star_share, sr.stale, sr.thin, sr.negative_cluster, sr.reviews_to_pass, sr.details,
            sr.rank_low, sr.rank_median, sr.rank_high
     FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = :snapshotId
     ORDER BY sr.smoothed_rank ASC, sr.n DESC, i.sku ASC`,
    { replacements: { snapshotId }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => {
    const d = json<Details>(r.details);
    return {
      sku: r.sku,
      title: r.title,
      n: r.n,
      rawMean: r.raw_mean,
      smoothed: r.smoothed,
      lowerBound: r.lower_bound,
      naiveRank: r.naive_rank,
      smoothedRank: r.smoothed_rank,
      drift: r.drift,
      naiveMovement: r.naive_movement,
      smoothedMovement: r.smoothed_movement,
      newestAgeDays: r.newest_age_days,
      medianAgeDays: r.median_age_days,
      recentShare: r.recent_share,
      oneStarShare: r.one_star_share,
      stale: Boolean(r.stale),
      thin: Boolean(r.thin),
      negativeCluster: Boolean(r.negative_cluster),
      staleReason: d.staleReason ?? null,
      clusterReason: d.clusterReason ?? null,
      clusterObserved: d.clusterObserved ?? null,
      clusterExpected: d.clusterExpected ?? null,
      clusterPValue: d.clusterPValue ?? null,
      recurringPhrases: d.recurringPhrases ?? [],
      whatItTakes: d.whatItTakes,
      reviewsToPass: r.reviews_to_pass,
      aboveSku: d.aboveSku ?? null,
      aboveScore: d.aboveScore ?? null,
      rankLow: r.rank_low,
      rankMedian: r.rank_median,
      rankHigh: r.rank_high,
    };
  });
}

async function previousWeek(
  categoryId: number,
  isoWeek: string,
  movers: readonly string[] = [],
): Promise<DigestPreviousWeek | null> {
  const prev = await Snapshot.findOne({
    where: { categoryId, isoWeek: { [Op.lt]: isoWeek } },
    order: [['isoWeek', 'DESC']],
  });
  if (!prev) return null;
  const top = await db().query<{ sku: string }>(
    `SELECT i.sku FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = :id AND sr.smoothed_rank <= 10`,
    { replacements: { id: prev.id }, type: QueryTypes.SELECT },
  );
  // Last week's rank ranges of this week's movers only: enough to tell a clear move from noise.
  const ranges =
    movers.length === 0
      ? []
      : await db().query<{ sku: string; rank_low: number | null; rank_high: number | null }>(
          `SELECT i.sku, sr.rank_low, sr.rank_high FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
           WHERE sr.snapshot_id = :id AND i.sku IN (:skus) AND sr.rank_low IS NOT NULL`,
          { replacements: { id: prev.id, skus: [...movers] }, type: QueryTypes.SELECT },
        );
  const moverRanges: Record<string, { low: number; high: number }> = {};
  for (const r of ranges) moverRanges[r.sku] = { low: Number(r.rank_low), high: Number(r.rank_high) };
  return {
    isoWeek: prev.isoWeek,
    itemCount: prev.itemCount,
    reviewCount: prev.reviewCount,
    spearmanRho: prev.spearmanRho,
    kendallTauB: prev.kendallTauB,
    meanAbsDrift: prev.meanAbsDrift,
    maxAbsDrift: prev.maxAbsDrift,
    staleCount: prev.staleCount,
    thinCount: prev.thinCount,
    clusterCount: prev.clusterCount,
    topTen: top.map((t) => t.sku),
    moverRanges,
  };
}

/** Everything a category digest shows, from the stored snapshot of the week (nothing is recomputed). */
export async function loadCategoryDigestData(
  categoryId: number,
  isoWeek: string,
  now = new Date(),
): Promise<CategoryDigestData> {
  const category = await Category.findByPk(categoryId);
  if (!category) throw AppError.notFound('The category');
  const snapshot = await Snapshot.findOne({ where: { categoryId, isoWeek } });
  if (!snapshot) throw AppError.notFound(`The snapshot of ${category.name} for ${isoWeek}`);
  const figures = json<CategoryFigures>(snapshot.figures);
  const params = json<ResolvedParameters>(snapshot.params);
  const items = await snapshotItems(snapshot.id);
  const previous = await previousWeek(
    categoryId,
    isoWeek,
    figures.movers.map((m) => m.sku),
  );
  return {
    category: { slug: category.slug, name: category.name, description: category.description ?? '' },
    isoWeek,
    weekStart: day(isoWeekStart(isoWeek)),
    weekEnd: day(new Date(isoWeekEnd(isoWeek).getTime() - 1)),
    takenAt: snapshot.takenAt.toISOString(),
    generatedAt: now.toISOString(),
    webUrl: weekUrl(category.slug, isoWeek),
    figures,
    params,
    previous,
    rankLevel: snapshot.rankLevel,
    items,
    story: buildStory({ figures, params, items, previous }),
  };
}

export function portfolioStory(categories: CategoryDigestData[]): string[] {
  if (categories.length === 0) return ['No category has a snapshot for this week.'];
  const lines: string[] = [];
  const reviews = categories.reduce((s, c) => s + c.figures.reviewCount, 0);
  const items = categories.reduce((s, c) => s + c.figures.itemCount, 0);
  lines.push(
    `${countOf(categories.length, 'category', 'categories')}, ${countOf(items, 'item')} and ${countOf(reviews, 'review')} this week.`,
  );
  const withRho = categories.filter((c) => c.figures.spearmanRho !== null);
  const lowest = [...withRho].sort((a, b) => a.figures.spearmanRho! - b.figures.spearmanRho!)[0];
  if (lowest) {
    lines.push(
      `The raw and smoothed orderings disagree most in ${lowest.category.name} (Spearman's rho ${lowest.figures.spearmanRho!.toFixed(3)}): its shelf order depends most on which score is used.`,
    );
  }
  const clusters = categories.filter((c) => c.figures.negativeClusterCount > 0);
  if (clusters.length) {
    lines.push(
      `Negative clusters to read: ${clusters.map((c) => `${c.category.name} (${c.figures.negativeClusterCount})`).join(', ')}.`,
    );
  } else lines.push('No category shows a burst of one-star reviews this week.');
  const stale = categories.reduce((s, c) => s + c.figures.staleCount, 0);
  if (stale)
    lines.push(
      `${countOf(stale, 'item', 'items')} across the portfolio ${stale === 1 ? 'has' : 'have'} had no new review for longer than their category allows.`,
    );
  return lines;
}

export async function loadPortfolioDigestData(
  isoWeek: string,
  categoryIds: number[] | null = null,
  now = new Date(),
): Promise<PortfolioDigestData> {
  const snapshots = await Snapshot.findAll({
    where: { isoWeek, ...(categoryIds ? { categoryId: categoryIds } : {}) },
    attributes: ['categoryId'],
  });
  const categories: CategoryDigestData[] = [];
  for (const s of snapshots) categories.push(await loadCategoryDigestData(s.categoryId, isoWeek, now));
  categories.sort((a, b) => a.category.name.localeCompare(b.category.name));
  const publicUrl = loadConfig().publicUrl.replace(/\/$/, '');
  return {
    isoWeek,
    weekStart: day(isoWeekStart(isoWeek)),
    weekEnd: day(new Date(isoWeekEnd(isoWeek).getTime() - 1)),
    generatedAt: now.toISOString(),
    webUrl: `${publicUrl}/?week=${encodeURIComponent(isoWeek)}`,
    categories,
    story: portfolioStory(categories),
  };
}

function categorySummary(data: CategoryDigestData): DigestSummary {
  return {
    title: `${data.category.name}: weekly digest ${data.isoWeek}`,
    kind: 'category',
    isoWeek: data.isoWeek,
    weekStart: data.weekStart,
    weekEnd: data.weekEnd,
    categorySlug: data.category.slug,
    categoryName: data.category.name,
    webUrl: data.webUrl,
    keyFigures: keyFigures(data),
    headline: data.story.headline,
    changes: data.story.changes,
    categories: [],
  };
}

function portfolioSummary(data: PortfolioDigestData): DigestSummary {
  return {
    title: `Portfolio digest ${data.isoWeek}`,
    kind: 'portfolio',
    isoWeek: data.isoWeek,
    weekStart: data.weekStart,
    weekEnd: data.weekEnd,
    categorySlug: null,
    categoryName: null,
    webUrl: data.webUrl,
    keyFigures: [
      { label: 'Categories', value: String(data.categories.length) },
      {
        label: 'Reviews counted',
        value: data.categories.reduce((s, c) => s + c.figures.reviewCount, 0).toLocaleString('en-GB'),
      },
      {
        label: 'Negative clusters',
        value: String(data.categories.reduce((s, c) => s + c.figures.negativeClusterCount, 0)),
      },
    ],
    headline: data.story,
    changes: [],
    categories: data.categories.map((c) => ({
      name: c.category.name,
      slug: c.category.slug,
      url: c.webUrl,
      line: `rho ${c.figures.spearmanRho === null ? 'n/a' : c.figures.spearmanRho.toFixed(3)} · ${c.figures.topOverlap.shared} of top ${c.figures.topOverlap.depth} shared · ${c.figures.thinCount} thin · ${c.figures.staleCount} stale · ${countOf(c.figures.negativeClusterCount, 'cluster')}`,
    })),
  };
}

async function store(
  kind: DigestKind,
  categoryId: number,
  isoWeek: string,
  paper: PaperSize,
  rendered: { pdf: Buffer; pages: number },
  summary: DigestSummary,
  now: Date,
): Promise<number> {
  const sha256 = createHash('sha256').update(rendered.pdf).digest('hex');
  await db().query(
    `INSERT INTO digests (kind, category_id, iso_week, paper, pdf, sha256, size_bytes, page_count, summary, created_at)
     VALUES (:kind, :categoryId, :isoWeek, :paper, :pdf, :sha256, :size, :pages, :summary, :now)
     ON DUPLICATE KEY UPDATE paper = VALUES(paper), pdf = VALUES(pdf), sha256 = VALUES(sha256),
       size_bytes = VALUES(size_bytes), page_count = VALUES(page_count), summary = VALUES(summary),
       created_at = VALUES(created_at)`,
    {
      replacements: {
        kind,
        categoryId,
        isoWeek,
        paper,
        pdf: rendered.pdf,
        sha256,
        size: rendered.pdf.length,
        pages: rendered.pages,
        summary: JSON.stringify(summary),
        now,
      },
    },
  );
  const row = await Digest.findOne({ where: { kind, categoryId, isoWeek }, attributes: ['id'] });
  return row!.id;
}

/** pdfkit renders in a worker thread: a 500-item digest takes seconds of CPU the event loop must not spend. */
async function renderInWorker(task: DigestTask): Promise<{ pdf: Buffer; pages: number }> {
  const { pdf, pages } = await runInWorker<RenderedDigest>(task, { wait: true });
  return { pdf: Buffer.from(pdf.buffer, pdf.byteOffset, pdf.byteLength), pages };
}

export type ProduceOptions = {
  isoWeek: string;
  /** Categories to render; every category with a snapshot of the week when null or absent. */
  categoryIds?: number[] | null;
  /** The schedule whose run asked for these digests: its extra recipients get the category digests. */
  scheduleId?: number | null;
  extraRecipients?: string[];
  /** Queue mail to the subscribers (default true). */
  mail?: boolean;
  /** Build the portfolio digest: 'auto' once every category of the schedule has its snapshot of the week. */
  portfolio?: boolean | 'auto';
  paper?: PaperSize;
  now?: Date;
  log?: (line: string) => void;
};

/**
 * Renders and stores the digests of a week and queues their mail. Rendering again replaces the PDF of the
 * same category and week; mail already queued for a recipient is never queued twice (unique key).
 */
export async function produceDigests(options: ProduceOptions): Promise<ProduceDigestsResult> {
  const now = options.now ?? new Date();
  const log = options.log ?? (() => {});
  const paper = options.paper ?? loadConfig().digestPaper;
  const schedule = options.scheduleId ? await ReportSchedule.findByPk(options.scheduleId) : null;
  const scheduleCategories = schedule ? json<number[] | null>(schedule.categoryIds) : null;
  const extra = [
    ...(options.extraRecipients ?? []),
    ...(schedule ? json<string[]>(schedule.recipients) : []),
  ];
  const wanted = options.categoryIds ?? null;
  const snapshots = await Snapshot.findAll({
    where: { isoWeek: options.isoWeek, ...(wanted ? { categoryId: wanted } : {}) },
    attributes: ['categoryId'],
    order: [['categoryId', 'ASC']],
  });
  const have = new Set(snapshots.map((s) => s.categoryId));
  const skipped = (wanted ?? [])
    .filter((id) => !have.has(id))
    .map((id) => `category ${id}: no snapshot of ${options.isoWeek}`);
  const result: ProduceDigestsResult = { isoWeek: options.isoWeek, digests: [], queued: 0, skipped };
  for (const { categoryId } of snapshots) {
    const data = await loadCategoryDigestData(categoryId, options.isoWeek, now);
    const rendered = await renderInWorker({ kind: 'digest', digest: 'category', data, paper });
    const id = await store(
      'category',
      categoryId,
      options.isoWeek,
      paper,
      rendered,
      categorySummary(data),
      now,
    );
    result.digests.push({ id, kind: 'category', category: data.category.slug });
    log(
      `Digest of ${data.category.name} for ${options.isoWeek}: ${countOf(rendered.pages, 'page')}, ${countOf(rendered.pdf.length, 'byte')}.`,
    );
    if (options.mail !== false) {
      const recipients = await categoryRecipients(categoryId, extra);
      const queued = await queueDeliveries(id, categoryTarget(categoryId), recipients, now);
      result.queued += queued;
      log(
        `Queued ${countOf(queued, 'mail')} of ${data.category.name} (${countOf(recipients.length, 'recipient')}).`,
      );
    }
  }

  let buildPortfolio = options.portfolio === true;
  if (options.portfolio === 'auto' || options.portfolio === undefined) {
    const scope = await Category.findAll({
      where: scheduleCategories ? { id: scheduleCategories } : {},
      attributes: ['id'],
    });
    const taken = await Snapshot.count({
      where: { isoWeek: options.isoWeek, categoryId: scope.map((c) => c.id) },
    });
    buildPortfolio = scope.length > 0 && taken === scope.length;
  }
  if (buildPortfolio) {
    const data = await loadPortfolioDigestData(options.isoWeek, scheduleCategories, now);
    if (data.categories.length > 0) {
      const rendered = await renderInWorker({ kind: 'digest', digest: 'portfolio', data, paper });
      const id = await store('portfolio', 0, options.isoWeek, paper, rendered, portfolioSummary(data), now);
      result.digests.push({ id, kind: 'portfolio', category: null });
      log(`Portfolio digest for ${options.isoWeek}: ${countOf(rendered.pages, 'page')}.`);
      if (options.mail !== false) {
        const queued = await queueDeliveries(id, portfolioTarget, await portfolioRecipients(), now);
        result.queued += queued;
        log(`Queued ${countOf(queued, 'portfolio mail')}.`);
      }
    }
  }
  return result;
}

/** The schedule a job run belongs to (its extra recipients receive the digests). */
export async function scheduleOfRun(runId: number): Promise<number | null> {
  const run = await JobRun.findByPk(runId, { attributes: ['scheduleId'] });
  return run?.scheduleId ?? null;
}

export async function produceDigestsForSlugs(
  input: { isoWeek: string; categories?: string[] | undefined; mail: boolean },
  now = new Date(),
): Promise<ProduceDigestsResult> {
  let ids: number[] | null = null;
  if (input.categories?.length) {
    const rows = await Category.findAll({ where: { slug: input.categories }, attributes: ['id', 'slug'] });
    const missing = input.categories.filter((s) => !rows.some((r) => r.slug === s));
    if (missing.length)
      throw new AppError('validation_failed', `Unknown category: ${missing.join(', ')}.`, 400);
    ids = rows.map((r) => r.id);
  }
  const have = await Snapshot.count({
    where: { isoWeek: input.isoWeek, ...(ids ? { categoryId: ids } : {}) },
  });
  if (have === 0)
    throw new AppError(
      'not_found',
      `No snapshot exists for ${input.isoWeek} yet; take the snapshot first.`,
      404,
    );
  return produceDigests({
    isoWeek: input.isoWeek,
    categoryIds: ids,
    mail: input.mail,
    portfolio: ids === null ? true : 'auto',
    now,
  });
}

/* Archive */

async function deliveryCounts(
  ids: number[],
): Promise<Map<number, { queued: number; sent: number; failed: number }>> {
  const out = new Map<number, { queued: number; sent: number; failed: number }>();
  if (ids.length === 0) return out;
  const rows = await MailDelivery.findAll({
    where: { digestId: ids },
    attributes: ['digestId', 'status', [db().fn('COUNT', db().col('id')), 'count']],
    group: ['digestId', 'status'],
    raw: true,
  });
  for (const r of rows as unknown as { digestId: number; status: string; count: number }[]) {
    const entry = out.get(r.digestId) ?? { queued: 0, sent: 0, failed: 0 };
    if (r.status === 'sent') entry.sent += Number(r.count);
    else if (r.status === 'failed') entry.failed += Number(r.count);
    else entry.queued += Number(r.count);
    out.set(r.digestId, entry);
  }
  return out;
}

function toRecord(
  d: Digest,
  slug: string | null,
  name: string | null,
  counts: { queued: number; sent: number; failed: number } | undefined,
): DigestRecord {
  const base =
    d.kind === 'portfolio'
      ? `/api/portfolio/digests/${d.isoWeek}/pdf`
      : `/api/categories/${encodeURIComponent(slug ?? '')}/digests/${d.isoWeek}/pdf`;
  return {
    id: d.id,
    kind: d.kind,
    categorySlug: slug,
    categoryName: name,
    isoWeek: d.isoWeek,
    paper: d.paper,
    sha256: d.sha256,
    pageCount: d.pageCount,
    sizeBytes: d.sizeBytes,
    createdAt: d.createdAt.toISOString(),
    fileName: digestFileName(d.kind, slug, d.isoWeek),
    previewUrl: `${base}?disposition=inline`,
    downloadUrl: base,
    deliveries: counts ?? { queued: 0, sent: 0, failed: 0 },
  };
}

const listAttributes = [
  'id',
  'kind',
  'categoryId',
  'isoWeek',
  'paper',
  'sha256',
  'pageCount',
  'sizeBytes',
  'createdAt',
];

export async function listCategoryDigests(category: {
  id: number;
  slug: string;
  name: string;
}): Promise<DigestRecord[]> {
  const rows = await Digest.findAll({
    where: { kind: 'category', categoryId: category.id },
    attributes: listAttributes,
    order: [['isoWeek', 'DESC']],
  });
  const counts = await deliveryCounts(rows.map((r) => r.id));
  return rows.map((r) => toRecord(r, category.slug, category.name, counts.get(r.id)));
}

export async function listPortfolioDigests(): Promise<DigestRecord[]> {
  const rows = await Digest.findAll({
    where: { kind: 'portfolio' },
    attributes: listAttributes,
    order: [['isoWeek', 'DESC']],
  });
  const counts = await deliveryCounts(rows.map((r) => r.id));
  return rows.map((r) => toRecord(r, null, null, counts.get(r.id)));
}

export type DigestFile = { pdf: Buffer; fileName: string; sha256: string };

export async function digestFile(
  kind: DigestKind,
  categoryId: number,
  slug: string | null,
  isoWeek: string,
): Promise<DigestFile> {
  const row = await Digest.findOne({ where: { kind, categoryId, isoWeek }, attributes: ['pdf', 'sha256'] });
  if (!row) throw AppError.notFound(`The digest of ${isoWeek}`);
  return { pdf: row.pdf, fileName: digestFileName(kind, slug, isoWeek), sha256: row.sha256 };
}
