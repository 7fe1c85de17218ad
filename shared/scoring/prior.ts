import type { PriorWeightStrategy, ScoringSettings } from './settings';
import { median } from './stats';
import type { EvidenceColumns } from './summary';
import type { StarHistogram } from './types';

export interface CategoryMoments {
  itemCount: number;
  reviewCount: number;
  meanCount: number;
  medianCount: number;
  minCount: number;
  maxCount: number;
  weightedMean: number | null;
  starShares: StarHistogram | null;
  /** Variance of a single star drawn from the pooled category shares. */
  shareVariance: number | null;
  epv: number | null;
  vhm: number | null;
}

/**
 * Category-level moments. EPV and VHM follow Bühlmann–Straub's method of moments:
 * EPV pools within-item variances (items with a histogram and n >= 2), VHM is
 * (sum n_i (r_i - r)^2 - (I - 1) EPV) / (N - sum n_i^2 / N) over items with reviews.
 */
export function categoryMoments(cols: EvidenceColumns): CategoryMoments {
  const { size, n, sumStars, histogram, hasHistogram } = cols;
  let total = 0;
  let totalStars = 0;
  let minCount = Number.POSITIVE_INFINITY;
  let maxCount = 0;
  const shares = [0, 0, 0, 0, 0];
  let histTotal = 0;
  let withinSS = 0;
  let withinDf = 0;
  for (let i = 0; i < size; i++) {
    const ni = n[i]!;
    total += ni;
    totalStars += sumStars[i]!;
    if (ni < minCount) minCount = ni;
    if (ni > maxCount) maxCount = ni;
    if (hasHistogram[i]) {
      let sq = 0;
      for (let k = 0; k < 5; k++) {
        const c = histogram[i * 5 + k]!;
        shares[k]! += c;
        sq += c * (k + 1) * (k + 1);
      }
      histTotal += ni;
      if (ni >= 2) {
        withinSS += sq - (sumStars[i]! * sumStars[i]!) / ni;
        withinDf += ni - 1;
      }
    }
  }
  const weightedMean = total > 0 ? totalStars / total : null;
  let starShares: StarHistogram | null = null;
  let shareVariance: number | null = null;
  if (histTotal > 0) {
    const s = shares.map((c) => c / histTotal);
    starShares = [s[0]!, s[1]!, s[2]!, s[3]!, s[4]!];
    let m1 = 0;
    let m2 = 0;
    for (let k = 0; k < 5; k++) {
      m1 += (k + 1) * s[k]!;
      m2 += (k + 1) * (k + 1) * s[k]!;
    }
    shareVariance = Math.max(0, m2 - m1 * m1);
  }
  const epv = withinDf > 0 ? Math.max(0, withinSS) / withinDf : null;
  let vhm: number | null = null;
  if (epv !== null && weightedMean !== null) {
    let between = 0;
    let sumSq = 0;
    let reviewed = 0;
    for (let i = 0; i < size; i++) {
      const ni = n[i]!;
      if (ni === 0) continue;
      reviewed++;
      const d = sumStars[i]! / ni - weightedMean;
      between += ni * d * d;
      sumSq += ni * ni;
    }
    const denom = total - sumSq / total;
    if (reviewed >= 2 && denom > 0) vhm = (between - (reviewed - 1) * epv) / denom;
  }
  return {
    itemCount: size,
    reviewCount: total,
    meanCount: total / size,
    medianCount: median(n),
    minCount,
    maxCount,
    weightedMean,
    starShares,
    shareVariance,
    epv,
    vhm,
  };
}

export interface ResolvedPrior {
  m: number;
  C: number;
  applied: PriorWeightStrategy;
  notes: string[];
}

export function priorMean(moments: CategoryMoments, settings: ScoringSettings, notes: string[]): number {
  if (settings.priorMeanStrategy === 'fixed' && settings.priorMeanValue !== null)
    return settings.priorMeanValue;
  if (moments.weightedMean === null) {
    notes.push('No reviews in the category: the prior mean falls back to 3, the middle of the scale.');
    return 3;
  }
  return moments.weightedMean;
}

/** m for a strategy, or null where the category cannot support it (credibility without EPV or VHM > 0). */
export function priorWeightFor(
  strategy: PriorWeightStrategy,
  moments: CategoryMoments,
  fixed: number | null,
): number | null {
  switch (strategy) {
    case 'mean':
      return moments.meanCount;
    case 'median':
      return moments.medianCount;
    case 'max':
      return moments.maxCount;
    case 'min':
      return moments.minCount;
    case 'total':
      return moments.reviewCount;
    case 'fixed':
      return fixed;
    case 'credibility':
      if (moments.epv === null || moments.vhm === null || moments.vhm <= 0) return null;
      return moments.epv / moments.vhm;
  }
}

/**
 * Resolves m. Credibility falls back when the category cannot support it:
 * without within-item variances (no histograms) to the mean count; with VHM <= 0, where the
 * category shows no spread in true means beyond noise and Bühlmann's m would be infinite,
 * to the total review count, the strongest pooling among the named strategies.
 */
export function resolvePrior(moments: CategoryMoments, settings: ScoringSettings): ResolvedPrior {
  const notes: string[] = [];
  const C = priorMean(moments, settings, notes);
  const strategy = settings.priorWeightStrategy;
  const m = priorWeightFor(strategy, moments, settings.priorWeightValue);
  if (m !== null) return { m, C, applied: strategy, notes };
  if (moments.epv === null || moments.vhm === null) {
    notes.push(
      'Credibility needs star histograms of items with two or more reviews; used the mean review count.',
    );
    return { m: moments.meanCount, C, applied: 'mean', notes };
  }
  notes.push(
    'Credibility: the spread of item means is no larger than sampling noise (VHM <= 0); used the total review count.',
  );
  return { m: moments.reviewCount, C, applied: 'total', notes };
}
