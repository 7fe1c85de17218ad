import { QueryTypes, type Transaction } from 'sequelize';
import type { ItemSummary, ScoringSettings, StarHistogram } from '../../../shared/scoring';
import { evidenceBeforeSql, inWindowSql, windowStart } from '../../../shared/iso-week';
import { db } from '../../db/sequelize';

export type CategoryEvidence = {
  /** The engine's input, one summary per item that had any evidence at the cut-off. */
  items: ItemSummary[];
  itemIds: number[];
};

type ReviewAggregate = {
  item_id: number;
  sku: string;
  title: string;
  n: number;
  sum_stars: number;
  h1: number;
  h2: number;
  h3: number;
  h4: number;
  h5: number;
  newest: Date;
  recent_count: number;
  dw: number;
  dws: number;
  dw2: number;
  hw: number;
  hws: number;
  rw: number | null;
  rws: number | null;
  total_recent: number;
  one_recent: number;
  total_base: number;
  one_base: number;
};

type ObservationRow = {
  item_id: number;
  sku: string;
  title: string;
  review_count: number;
  mean_stars: string | number | null;
  stars_1: number | null;
  stars_2: number | null;
  stars_3: number | null;
  stars_4: number | null;
  stars_5: number | null;
  newest_review_at: Date | null;
};

/** Age in days at the cut-off, as the engine measures it (exact seconds; reviews are stored to the second). */
const ageDays = 'TIMESTAMPDIFF(SECOND, r.reviewed_at, :cutoff) / 86400';

// Double arithmetic throughout: MariaDB's exact decimals would round the divisions differently from JS.
const votes = '(r.helpful_yes + r.helpful_no + 0e0)';
const share = `(r.helpful_yes / ${votes})`;
/** Wilson score lower bound of the helpful share (Wilson 1927), as shared/scoring computes it. */
const wilson = `IF(r.helpful_yes + r.helpful_no = 0, 0, GREATEST(0,
  (${share} + :hz * :hz / (2 * ${votes})
   - :hz * SQRT(${share} * (1 - ${share}) / ${votes} + :hz * :hz / (4 * ${votes} * ${votes})))
  / (1 + :hz * :hz / ${votes})))`;

function num(value: unknown): number {
  return value === null || value === undefined ? 0 : Number(value);
}

/**
 * Reads what the engine needs for one category at a cut-off straight from MariaDB aggregates: one
 * grouped pass over the (item, date, stars) index plus two window queries (median age, most helpful
 * review). Items known only through aggregate observations use their latest observation before the
 * cut-off. The result matches `summariseReviews` of shared/scoring review for review.
 */
export async function loadCategoryEvidence(
  categoryId: number,
  cutoff: Date,
  settings: ScoringSettings,
  transaction?: Transaction,
): Promise<CategoryEvidence> {
  const sequelize = db();
  const replacements: Record<string, unknown> = {
    categoryId,
    cutoff,
    hl: settings.halfLifeDays,
    hz: settings.helpfulZ,
    recentFrom: windowStart(cutoff, settings.recentWindowDays),
    clusterFrom: windowStart(cutoff, settings.clusterWindowDays),
    baselineFrom: windowStart(cutoff, settings.clusterWindowDays + settings.clusterBaselineDays),
  };
  // The one week boundary (shared/iso-week.ts): evidence is strictly before the cut-off.
  const scope = `FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.category_id = :categoryId AND ${evidenceBeforeSql('r.reviewed_at')}`;
  const recent = inWindowSql('r.reviewed_at', 'recentFrom');
  const cluster = inWindowSql('r.reviewed_at', 'clusterFrom');
  const baseline = `NOT ${cluster} AND ${inWindowSql('r.reviewed_at', 'baselineFrom')}`;

  const aggregates = await sequelize.query<ReviewAggregate>(
    `SELECT r.item_id, MIN(i.sku) AS sku, MIN(i.title) AS title,
       COUNT(*) AS n, SUM(r.stars) AS sum_stars,
       SUM(r.stars = 1) AS h1, SUM(r.stars = 2) AS h2, SUM(r.stars = 3) AS h3, SUM(r.stars = 4) AS h4, SUM(r.stars = 5) AS h5,
       MAX(r.reviewed_at) AS newest,
       SUM(${recent}) AS recent_count,
       SUM(POW(0.5, ${ageDays} / :hl)) AS dw,
       SUM(POW(0.5, ${ageDays} / :hl) * r.stars) AS dws,
       SUM(POW(0.25, ${ageDays} / :hl)) AS dw2,
       SUM(${wilson}) AS hw,
       SUM(${wilson} * r.stars) AS hws,
       SUM(r.reviewer_score) AS rw, SUM(r.reviewer_score * r.stars) AS rws,
       SUM(${cluster}) AS total_recent,
       SUM(${cluster} AND r.stars = 1) AS one_recent,
       SUM(${baseline}) AS total_base,
       SUM(${baseline} AND r.stars = 1) AS one_base
     ${scope}
     GROUP BY r.item_id`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );

  // Only recent one-star reviews are read for their text, so the grouped pass above stays on the index.
  const phraseCountsByItem = new Map<number, Record<string, number>>();
  if (settings.clusterPhrases.length > 0) {
    const phraseSums = settings.clusterPhrases.map((phrase, k) => {
      replacements[`p${k}`] = phrase;
      return `SUM(LOCATE(:p${k}, r.body) > 0) AS phrase_${k}`;
    });
    const rows = await sequelize.query<Record<string, number>>(
      `SELECT r.item_id, ${phraseSums.join(', ')}
       ${scope} AND r.stars = 1 AND ${cluster} AND r.body IS NOT NULL
       GROUP BY r.item_id`,
      { replacements, type: QueryTypes.SELECT, transaction },
    );
    for (const row of rows) {
      const counts: Record<string, number> = {};
      settings.clusterPhrases.forEach((phrase, k) => (counts[phrase] = num(row[`phrase_${k}`])));
      phraseCountsByItem.set(Number(row.item_id), counts);
    }
  }

  const medians = await sequelize.query<{ item_id: number; med: number }>(
    `SELECT DISTINCT r.item_id, MEDIAN(TIMESTAMPDIFF(SECOND, r.reviewed_at, :cutoff)) OVER (PARTITION BY r.item_id) AS med
     ${scope}`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  const medianByItem = new Map(medians.map((m) => [Number(m.item_id), Number(m.med) / 86400]));

  const helpful = await sequelize.query<{ item_id: number; stars: number; reviewed_at: Date }>(
    `SELECT item_id, stars, reviewed_at FROM (
       SELECT r.item_id, r.stars, r.reviewed_at,
         ROW_NUMBER() OVER (PARTITION BY r.item_id ORDER BY ${wilson} DESC, r.reviewed_at DESC) AS place
       ${scope} AND r.helpful_yes > 0
     ) ranked WHERE place = 1`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  const helpfulByItem = new Map(helpful.map((h) => [Number(h.item_id), h]));

  const items: ItemSummary[] = [];
  const itemIds: number[] = [];
  for (const a of aggregates) {
    const id = Number(a.item_id);
    const best = helpfulByItem.get(id);
    const hasReviewer = a.rw !== null;
    const phraseCounts =
      phraseCountsByItem.get(id) ?? Object.fromEntries(settings.clusterPhrases.map((phrase) => [phrase, 0]));
    itemIds.push(id);
    items.push({
      sku: a.sku,
      title: a.title,
      n: num(a.n),
      sumStars: num(a.sum_stars),
      histogram: [num(a.h1), num(a.h2), num(a.h3), num(a.h4), num(a.h5)],
      newestAt: new Date(a.newest).toISOString(),
      medianAgeDays: medianByItem.get(id) ?? null,
      recentCount: num(a.recent_count),
      decayWeightSum: num(a.dw),
      decayWeightedStarSum: num(a.dws),
      decayWeightSqSum: num(a.dw2),
      helpfulWeightSum: num(a.hw),
      helpfulWeightedStarSum: num(a.hws),
      mostHelpfulStars: best ? Number(best.stars) : null,
      mostHelpfulAt: best ? new Date(best.reviewed_at).toISOString() : null,
      reviewerWeightSum: hasReviewer ? num(a.rw) : null,
      reviewerWeightedStarSum: hasReviewer ? num(a.rws) : null,
      oneStarRecent: num(a.one_recent),
      totalRecent: num(a.total_recent),
      oneStarBaseline: num(a.one_base),
      totalBaseline: num(a.total_base),
      phraseCounts,
    });
  }

  // Items known only from aggregate observations: their latest observation at the cut-off.
  const observations = await sequelize.query<ObservationRow>(
    `SELECT a.item_id, i.sku, i.title, a.review_count, a.mean_stars,
       a.stars_1, a.stars_2, a.stars_3, a.stars_4, a.stars_5, a.newest_review_at
     FROM aggregate_observations a
     JOIN items i ON i.id = a.item_id
     JOIN (SELECT o.item_id, MAX(o.observed_on) AS observed_on
           FROM aggregate_observations o JOIN items oi ON oi.id = o.item_id
           WHERE oi.category_id = :categoryId AND ${evidenceBeforeSql('o.observed_on')}
           GROUP BY o.item_id) latest ON latest.item_id = a.item_id AND latest.observed_on = a.observed_on
     WHERE NOT EXISTS (SELECT 1 FROM reviews r WHERE r.item_id = a.item_id AND ${evidenceBeforeSql('r.reviewed_at')})`,
    { replacements, type: QueryTypes.SELECT, transaction },
  );
  for (const o of observations) {
    const n = num(o.review_count);
    const mean = o.mean_stars === null ? null : Number(o.mean_stars);
    const counts = [o.stars_1, o.stars_2, o.stars_3, o.stars_4, o.stars_5];
    const histogram = counts.every((c) => c !== null) ? (counts.map(num) as unknown as StarHistogram) : null;
    const sumStars = histogram ? histogram.reduce((s, c, k) => s + c * (k + 1), 0) : n * (mean ?? 0);
    itemIds.push(Number(o.item_id));
    items.push({
      sku: o.sku,
      title: o.title,
      n,
      sumStars,
      histogram,
      newestAt: o.newest_review_at ? new Date(o.newest_review_at).toISOString() : null,
      medianAgeDays: null,
      recentCount: null,
      decayWeightSum: null,
      decayWeightedStarSum: null,
      decayWeightSqSum: null,
      helpfulWeightSum: null,
      helpfulWeightedStarSum: null,
      mostHelpfulStars: null,
      mostHelpfulAt: null,
      reviewerWeightSum: null,
      reviewerWeightedStarSum: null,
      oneStarRecent: null,
      totalRecent: null,
      oneStarBaseline: null,
      totalBaseline: null,
      phraseCounts: null,
    });
  }
  return { items, itemIds };
}
