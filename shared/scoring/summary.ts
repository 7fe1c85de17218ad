import { instantMs } from '../clock';
import { isEvidenceBefore, isInWindow } from '../iso-week';
import { ScoringInputError } from './errors';
import type { ScoringSettings } from './settings';
import { median, wilsonLowerBound } from './stats';
import type { EvidenceSummary, ItemInput, ReviewInput, StarHistogram } from './types';

export const DAY_MS = 86_400_000;

export type SummarySettings = Pick<
  ScoringSettings,
  | 'halfLifeDays'
  | 'recentWindowDays'
  | 'clusterWindowDays'
  | 'clusterBaselineDays'
  | 'clusterPhrases'
  | 'helpfulZ'
>;

export function toEpochMs(value: string | Date, path: string): number {
  const ms = instantMs(value);
  if (!Number.isFinite(ms)) throw new ScoringInputError('date-invalid', path, 'must be a valid date');
  return ms;
}

function checkStars(stars: unknown, path: string): number {
  if (typeof stars !== 'number' || !Number.isInteger(stars) || stars < 1 || stars > 5) {
    throw new ScoringInputError('stars-out-of-range', path, 'must be a whole number from 1 to 5');
  }
  return stars;
}

function checkVotes(value: number | undefined, path: string): number {
  if (value === undefined) return 0;
  if (!Number.isInteger(value) || value < 0) {
    throw new ScoringInputError('helpful-invalid', path, 'must be a whole number of 0 or more');
  }
  return value;
}

/**
 * Turns individual reviews into the summary the SQL path produces, as of the cut-off `asOf`.
 * Only reviews strictly before the cut-off count (shared/iso-week.ts, the one week boundary).
 */
export function summariseReviews(
  reviews: readonly ReviewInput[],
  asOf: string | Date,
  settings: SummarySettings,
  path = 'reviews',
): EvidenceSummary {
  const asOfMs = toEpochMs(asOf, 'asOf');
  const hist: [number, number, number, number, number] = [0, 0, 0, 0, 0];
  const phrases = settings.clusterPhrases.map((p) => p.toLowerCase());
  const phraseCounts: Record<string, number> = {};
  for (const p of settings.clusterPhrases) phraseCounts[p] = 0;
  const ages: number[] = [];
  let n = 0;
  let sumStars = 0;
  let newest = Number.NEGATIVE_INFINITY;
  let recentCount = 0;
  let dw = 0;
  let dws = 0;
  let dw2 = 0;
  let hw = 0;
  let hws = 0;
  let bestHelpful = 0;
  let bestHelpfulStars: number | null = null;
  let bestHelpfulAt = Number.NEGATIVE_INFINITY;
  let rw = 0;
  let rws = 0;
  let anyReviewer = false;
  let oneRecent = 0;
  let totalRecent = 0;
  let oneBase = 0;
  let totalBase = 0;
  for (let i = 0; i < reviews.length; i++) {
    const r = reviews[i]!;
    const p = `${path}.${i}`;
    const stars = checkStars(r.stars, `${p}.stars`);
    const at = toEpochMs(r.reviewedAt, `${p}.reviewedAt`);
    const yes = checkVotes(r.helpfulYes, `${p}.helpfulYes`);
    const no = checkVotes(r.helpfulNo, `${p}.helpfulNo`);
    const score = r.reviewerScore;
    if (score !== undefined && score !== null && !(score >= 0 && score <= 1)) {
      throw new ScoringInputError('reviewer-score-invalid', `${p}.reviewerScore`, 'must be between 0 and 1');
    }
    if (!isEvidenceBefore(at, asOfMs)) continue;
    const age = (asOfMs - at) / DAY_MS;
    n++;
    sumStars += stars;
    hist[stars - 1]!++;
    ages.push(age);
    if (at > newest) newest = at;
    if (isInWindow(at, asOfMs, settings.recentWindowDays)) recentCount++;
    const w = Math.pow(0.5, age / settings.halfLifeDays);
    dw += w;
    dws += w * stars;
    dw2 += w * w;
    const h = wilsonLowerBound(yes, yes + no, settings.helpfulZ);
    hw += h;
    hws += h * stars;
    if (h > 0 && (h > bestHelpful || (h === bestHelpful && at > bestHelpfulAt))) {
      bestHelpful = h;
      bestHelpfulStars = stars;
      bestHelpfulAt = at;
    }
    if (score !== undefined && score !== null) {
      anyReviewer = true;
      rw += score;
      rws += score * stars;
    }
    if (isInWindow(at, asOfMs, settings.clusterWindowDays)) {
      totalRecent++;
      if (stars === 1) {
        oneRecent++;
        const text = r.text?.toLowerCase();
        if (text) {
          for (let k = 0; k < phrases.length; k++) {
            if (text.includes(phrases[k]!)) phraseCounts[settings.clusterPhrases[k]!]!++;
          }
        }
      }
    } else if (isInWindow(at, asOfMs, settings.clusterWindowDays + settings.clusterBaselineDays)) {
      totalBase++;
      if (stars === 1) oneBase++;
    }
  }
  return {
    n,
    sumStars,
    histogram: hist,
    newestAt: n > 0 ? new Date(newest).toISOString() : null,
    medianAgeDays: n > 0 ? median(ages) : null,
    recentCount,
    decayWeightSum: dw,
    decayWeightedStarSum: dws,
    decayWeightSqSum: dw2,
    helpfulWeightSum: hw,
    helpfulWeightedStarSum: hws,
    mostHelpfulStars: bestHelpfulStars,
    mostHelpfulAt: bestHelpfulStars === null ? null : new Date(bestHelpfulAt).toISOString(),
    reviewerWeightSum: anyReviewer ? rw : null,
    reviewerWeightedStarSum: anyReviewer ? rws : null,
    oneStarRecent: oneRecent,
    totalRecent,
    oneStarBaseline: oneBase,
    totalBaseline: totalBase,
    phraseCounts,
  };
}

function checkCount(value: unknown, path: string): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 0) {
    throw new ScoringInputError('count-invalid', path, 'must be a whole number of 0 or more');
  }
  return value;
}

function checkMean(value: unknown, path: string): number {
  if (typeof value !== 'number' || !(value >= 1 && value <= 5)) {
    throw new ScoringInputError('mean-out-of-range', path, 'must be between 1 and 5');
  }
  return value;
}

function checkHistogram(value: unknown, path: string): StarHistogram {
  if (!Array.isArray(value) || value.length !== 5) {
    throw new ScoringInputError('histogram-invalid', path, 'must list five counts, one-star first');
  }
  for (let k = 0; k < 5; k++) checkCount(value[k], `${path}.${k}`);
  return value as unknown as StarHistogram;
}

/** Tolerance for a stated mean against its histogram: means are commonly shown to one or two decimals. */
const MEAN_TOLERANCE = 0.05;

/**
 * Columnar form of a category's evidence: the hot loops read these typed arrays, never the inputs.
 * NaN stands for "not known from the input".
 */
export interface EvidenceColumns {
  size: number;
  skus: string[];
  titles: (string | null)[];
  n: Float64Array;
  sumStars: Float64Array;
  /** 5 per item; only meaningful where hasHistogram is 1. */
  histogram: Float64Array;
  hasHistogram: Uint8Array;
  summaries: (EvidenceSummary | null)[];
}

function isSummary(item: ItemInput): item is ItemInput & EvidenceSummary {
  return 'sumStars' in item && 'n' in item;
}

export function toColumns(
  items: readonly ItemInput[],
  asOf: string | Date,
  settings: SummarySettings,
  path = 'items',
): EvidenceColumns {
  if (items.length === 0)
    throw new ScoringInputError('empty-category', path, 'a category needs at least one item');
  const size = items.length;
  const cols: EvidenceColumns = {
    size,
    skus: new Array<string>(size),
    titles: new Array<string | null>(size),
    n: new Float64Array(size),
    sumStars: new Float64Array(size),
    histogram: new Float64Array(size * 5),
    hasHistogram: new Uint8Array(size),
    summaries: new Array<EvidenceSummary | null>(size),
  };
  const seen = new Set<string>();
  for (let i = 0; i < size; i++) {
    const item = items[i]!;
    const p = `${path}.${i}`;
    if (seen.has(item.sku))
      throw new ScoringInputError('duplicate-sku', `${p}.sku`, 'appears twice in the category');
    seen.add(item.sku);
    cols.skus[i] = item.sku;
    cols.titles[i] = item.title ?? null;
    let summary: EvidenceSummary | null = null;
    let hist: StarHistogram | null = null;
    if ('reviews' in item) {
      summary = summariseReviews(item.reviews, asOf, settings, `${p}.reviews`);
      hist = summary.histogram;
      cols.n[i] = summary.n;
      cols.sumStars[i] = summary.sumStars;
    } else if (isSummary(item)) {
      summary = item;
      const n = checkCount(item.n, `${p}.n`);
      if (!(item.sumStars >= n && item.sumStars <= 5 * n)) {
        throw new ScoringInputError('mean-out-of-range', `${p}.sumStars`, 'must be between n and 5n');
      }
      if (item.histogram) {
        hist = checkHistogram(item.histogram, `${p}.histogram`);
        const total = hist[0] + hist[1] + hist[2] + hist[3] + hist[4];
        if (total !== n) {
          throw new ScoringInputError(
            'histogram-count-mismatch',
            `${p}.histogram`,
            `counts add up to ${total}, not ${n}`,
          );
        }
      }
      cols.n[i] = n;
      cols.sumStars[i] = item.sumStars;
    } else if ('histogram' in item && item.histogram) {
      hist = checkHistogram(item.histogram, `${p}.histogram`);
      const total = hist[0] + hist[1] + hist[2] + hist[3] + hist[4];
      const sum = hist[0] + 2 * hist[1] + 3 * hist[2] + 4 * hist[3] + 5 * hist[4];
      if (item.count !== undefined && item.count !== null) {
        const count = checkCount(item.count, `${p}.count`);
        if (count !== total) {
          throw new ScoringInputError(
            'histogram-count-mismatch',
            `${p}.histogram`,
            `counts add up to ${total}, not ${count}`,
          );
        }
      }
      if (item.mean !== undefined && item.mean !== null) {
        const mean = checkMean(item.mean, `${p}.mean`);
        if (total > 0 && Math.abs(mean - sum / total) > MEAN_TOLERANCE) {
          throw new ScoringInputError(
            'histogram-mean-mismatch',
            `${p}.mean`,
            `does not match the histogram's mean`,
          );
        }
      }
      cols.n[i] = total;
      cols.sumStars[i] = sum;
    } else {
      const cm = item as { count?: unknown; mean?: unknown };
      const count = checkCount(cm.count, `${p}.count`);
      if (count > 0) {
        if (cm.mean === undefined || cm.mean === null) {
          throw new ScoringInputError('mean-missing', `${p}.mean`, 'is required when count is above 0');
        }
        cols.sumStars[i] = count * checkMean(cm.mean, `${p}.mean`);
      } else if (cm.mean !== undefined && cm.mean !== null) checkMean(cm.mean, `${p}.mean`);
      cols.n[i] = count;
    }
    cols.summaries[i] = summary;
    if (hist) {
      cols.hasHistogram[i] = 1;
      for (let k = 0; k < 5; k++) cols.histogram[i * 5 + k] = hist[k]!;
    }
  }
  return cols;
}
