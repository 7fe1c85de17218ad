import { categoryMoments, resolvePrior } from './prior';
import {
  competitionRanks,
  kendallPartsOfRanks,
  orderByScore,
  rankBiasedOverlap,
  spearmanRhoOfRanks,
  topOverlap,
} from './rank-stats';
import { resolveSettings } from './settings';
import type { ScoringSettings } from './settings';
import { reviewsToPass } from './smoothing';
import { conditionalRateTest } from './stats';
import { DAY_MS, toColumns, toEpochMs } from './summary';
import type { EvidenceColumns } from './summary';
import type {
  CategoryFigures,
  ItemInput,
  ItemResult,
  LowerBoundBasis,
  Mover,
  PreviousRankingEntry,
  ScoreResult,
} from './types';

export interface ScoreOptions {
  /** Cut-off of the snapshot; every age is measured from it. */
  asOf: string | Date;
  previous?: readonly PreviousRankingEntry[] | null;
}

/** Ratings 1..5: no variance can exceed (mean - 1)(5 - mean) (Bhatia–Davis bound). */
export function varianceBound(mean: number): number {
  return Math.max(0, (mean - 1) * (5 - mean));
}

/** Within-item star variance behind the lower bound: own histogram, else pooled, else Bhatia–Davis. */
export function itemSpread(
  cols: EvidenceColumns,
  i: number,
  rawMean: number,
  pooledWithin: number | null,
): { itemVar: number; basis: LowerBoundBasis } {
  const ni = cols.n[i]!;
  if (cols.hasHistogram[i]) {
    let sq = 0;
    for (let k = 0; k < 5; k++) sq += cols.histogram[i * 5 + k]! * (k + 1) * (k + 1);
    return { itemVar: ni > 0 ? Math.max(0, sq / ni - rawMean * rawMean) : 0, basis: 'histogram' };
  }
  if (pooledWithin !== null) return { itemVar: pooledWithin, basis: 'pooled-variance' };
  return { itemVar: ni > 0 ? varianceBound(rawMean) : 0, basis: 'variance-bound' };
}

/**
 * Posterior variance of an item's mean star under the Dirichlet model of the lower bound (DESIGN 4.3):
 * with a_k = m*p_k + n_k and a0 = m + n it is the second central moment of the pooled star shares
 * a_k / a0 divided by (a0 + 1). Without a histogram the item's own spread is `itemVar` (pooled or the
 * Bhatia–Davis bound). Zero when there is neither prior weight nor evidence.
 */
export function posteriorVariance(
  m: number,
  C: number,
  priorVariance: number,
  n: number,
  rawMean: number,
  itemVar: number,
  smoothed: number,
): number {
  const a0 = m + n;
  if (!(a0 > 0)) return 0;
  const dc = C - smoothed;
  const dr = n > 0 ? rawMean - smoothed : 0;
  const predictive = (m * (priorVariance + dc * dc) + n * (itemVar + dr * dr)) / a0;
  return predictive / (a0 + 1);
}

export function scoreCategory(
  items: readonly ItemInput[],
  settings: Partial<ScoringSettings> = {},
  options: ScoreOptions,
): ScoreResult {
  const s = resolveSettings(settings);
  const asOfMs = toEpochMs(options.asOf, 'asOf');
  const cols = toColumns(items, options.asOf, s);
  const { size, n, sumStars, histogram, hasHistogram, skus, summaries } = cols;
  const moments = categoryMoments(cols);
  const prior = resolvePrior(moments, s);
  const { m, C } = prior;
  const notes = [...prior.notes];

  const raw = new Float64Array(size);
  const smooth = new Float64Array(size);
  const mC = m * C;
  for (let i = 0; i < size; i++) {
    const ni = n[i]!;
    raw[i] = ni > 0 ? sumStars[i]! / ni : Number.NaN;
    const d = m + ni;
    smooth[i] = d > 0 ? (mC + sumStars[i]!) / d : C;
  }
  const naiveOrder = orderByScore(raw, n, skus);
  const smoothOrder = orderByScore(smooth, n, skus);
  const naiveRanks = competitionRanks(naiveOrder, raw);
  const smoothRanks = competitionRanks(smoothOrder, smooth);
  const naivePos = new Uint32Array(size);
  const smoothPos = new Uint32Array(size);
  for (let p = 0; p < size; p++) {
    naivePos[naiveOrder[p]!] = p + 1;
    smoothPos[smoothOrder[p]!] = p + 1;
  }

  // Competition ranks keep the ties of the scores, so rank correlations of them are those of the scores.
  const rho = spearmanRhoOfRanks(naiveRanks, smoothRanks);
  const tau = size >= 2 ? kendallPartsOfRanks(naiveRanks, smoothRanks).tauB : null;
  const depth = Math.min(s.topOverlapDepth, size);
  const shared = topOverlap(naiveOrder, smoothOrder, depth);
  const rbo = rankBiasedOverlap(naiveOrder, smoothOrder, s.rboP, size);

  const priorVariance = moments.shareVariance ?? varianceBound(C);
  const pooledWithin = moments.epv;
  const thinThreshold = s.thinEvidenceThreshold ?? moments.meanCount / 4;
  const v = s.whatItTakesStars;

  const previous = options.previous ? new Map(options.previous.map((e) => [e.sku, e])) : null;
  let previousMatched = 0;
  const movers: Mover[] = [];
  let sumAbsDrift = 0;
  let maxAbsDrift = 0;
  let staleCount = 0;
  let thinCount = 0;
  let clusterCount = 0;

  const results = new Array<ItemResult>(size);
  for (let i = 0; i < size; i++) {
    const ni = n[i]!;
    const r = raw[i]!;
    const si = smooth[i]!;
    const hasRaw = ni > 0;

    const { itemVar, basis } = itemSpread(cols, i, r, pooledWithin);
    const lowerBound = si - s.z * Math.sqrt(posteriorVariance(m, C, priorVariance, ni, r, itemVar, si));

    const drift = naiveRanks[i]! - smoothRanks[i]!;
    const absDrift = Math.abs(drift);
    sumAbsDrift += absDrift;
    if (absDrift > maxAbsDrift) maxAbsDrift = absDrift;

    let naiveMovement: number | null = null;
    let smoothedMovement: number | null = null;
    if (previous) {
      const prev = previous.get(skus[i]!);
      if (prev) {
        previousMatched++;
        naiveMovement = prev.naiveRank - naiveRanks[i]!;
        smoothedMovement = prev.smoothedRank - smoothRanks[i]!;
        if (Math.abs(naiveMovement) >= s.moverThreshold || Math.abs(smoothedMovement) >= s.moverThreshold) {
          movers.push({ sku: skus[i]!, naiveMovement, smoothedMovement });
        }
      }
    }

    const sum = summaries[i];
    let newestAgeDays: number | null = null;
    let stale: boolean | null = null;
    let staleReason: string | null = null;
    if (sum && sum.newestAt !== null) {
      newestAgeDays = (asOfMs - Date.parse(sum.newestAt)) / DAY_MS;
      stale = newestAgeDays > s.staleAfterDays;
      if (stale) {
        staleCount++;
        staleReason = `newest review is ${Math.floor(newestAgeDays)} days old`;
      }
    } else {
      staleReason = ni === 0 ? 'no reviews' : 'review dates not known';
    }
    const dw = sum?.decayWeightSum ?? null;
    const dws = sum?.decayWeightedStarSum ?? null;
    const dw2 = sum?.decayWeightSqSum ?? null;
    const hw = sum?.helpfulWeightSum ?? null;
    const hws = sum?.helpfulWeightedStarSum ?? null;
    const rw = sum?.reviewerWeightSum ?? null;
    const rws = sum?.reviewerWeightedStarSum ?? null;

    const thin = ni < thinThreshold;
    if (thin) thinCount++;

    let negativeCluster: boolean | null = null;
    let clusterReason: string | null = null;
    let clusterExpected: number | null = null;
    let clusterPValue: number | null = null;
    const recurringPhrases: { phrase: string; count: number }[] = [];
    const oneRecent = sum?.oneStarRecent ?? null;
    const totalRecent = sum?.totalRecent ?? null;
    const oneBase = sum?.oneStarBaseline ?? null;
    const totalBase = sum?.totalBaseline ?? null;
    if (oneRecent === null || totalRecent === null || oneBase === null || totalBase === null) {
      clusterReason = 'review dates not known';
    } else if (totalBase === 0) {
      clusterReason = 'no reviews in the baseline period';
    } else {
      // Conditioning on all one-star reviews of both periods removes the unknown baseline rate, so the
      // false-alarm rate stays at most clusterPValue whatever the item's own rate is.
      const test = conditionalRateTest(oneRecent, totalRecent, oneBase, totalBase);
      clusterExpected = test.expected;
      clusterPValue = test.pValue;
      negativeCluster = oneRecent >= s.clusterMinCount && clusterPValue < s.clusterPValue;
      if (negativeCluster) {
        clusterCount++;
        clusterReason = `${oneRecent} one-star reviews in ${s.clusterWindowDays} days against ${clusterExpected.toFixed(2)} expected`;
        const counts = sum?.phraseCounts;
        if (counts) {
          for (const [phrase, count] of Object.entries(counts))
            if (count >= 2) recurringPhrases.push({ phrase, count });
          recurringPhrases.sort((a, b) => b.count - a.count || (a.phrase < b.phrase ? -1 : 1));
        }
      }
    }

    let whatItTakes: ItemResult['whatItTakes'] = 'top';
    let reviewsNeeded: number | null = null;
    let aboveSku: string | null = null;
    let aboveScore: number | null = null;
    const pos = smoothPos[i]!;
    if (pos > 1) {
      const above = smoothOrder[pos - 2]!;
      aboveSku = skus[above]!;
      aboveScore = smooth[above]!;
      reviewsNeeded = reviewsToPass(m, C, ni, sumStars[i]!, aboveScore, v);
      whatItTakes = reviewsNeeded === null ? 'impossible' : 'reviews';
    }

    results[i] = {
      sku: skus[i]!,
      title: cols.titles[i]!,
      n: ni,
      rawMean: hasRaw ? r : null,
      smoothed: si,
      lowerBound,
      lowerBoundBasis: basis,
      naiveRank: naiveRanks[i]!,
      smoothedRank: smoothRanks[i]!,
      naivePosition: naivePos[i]!,
      smoothedPosition: pos,
      drift,
      naiveMovement,
      smoothedMovement,
      newestAgeDays,
      medianAgeDays: sum?.medianAgeDays ?? null,
      recentShare: sum && sum.recentCount !== null && ni > 0 ? sum.recentCount / ni : null,
      decayedMean: dw !== null && dws !== null && dw > 0 ? dws / dw : null,
      effectiveCount: dw !== null && dw2 !== null && dw2 > 0 ? (dw * dw) / dw2 : null,
      stale,
      staleReason,
      helpfulWeightedMean: hw !== null && hws !== null && hw > 0 ? hws / hw : null,
      mostHelpfulStars: sum?.mostHelpfulStars ?? null,
      mostHelpfulAt: sum?.mostHelpfulAt ?? null,
      reviewerWeightedMean: rw !== null && rws !== null && rw > 0 ? rws / rw : null,
      oneStarShare: hasHistogram[i] && ni > 0 ? histogram[i * 5]! / ni : null,
      thin,
      negativeCluster,
      clusterReason,
      clusterObserved: oneRecent,
      clusterExpected,
      clusterPValue,
      recurringPhrases,
      whatItTakes,
      reviewsToPass: reviewsNeeded,
      aboveSku,
      aboveScore,
    };
  }

  movers.sort(
    (a, b) =>
      Math.max(Math.abs(b.naiveMovement), Math.abs(b.smoothedMovement)) -
        Math.max(Math.abs(a.naiveMovement), Math.abs(a.smoothedMovement)) || (a.sku < b.sku ? -1 : 1),
  );

  const category: CategoryFigures = {
    itemCount: size,
    reviewCount: moments.reviewCount,
    meanCount: moments.meanCount,
    medianCount: moments.medianCount,
    weightedMean: moments.weightedMean,
    spearmanRho: rho,
    kendallTauB: tau,
    meanAbsDrift: sumAbsDrift / size,
    maxAbsDrift,
    topOverlap: { depth, shared, share: depth > 0 ? shared / depth : 0 },
    rbo,
    staleCount,
    thinCount,
    negativeClusterCount: clusterCount,
    previousMatched: previous ? previousMatched : null,
    movers,
  };

  return {
    items: results,
    category,
    resolved: {
      asOf: new Date(asOfMs).toISOString(),
      m,
      C,
      z: s.z,
      priorWeightStrategy: s.priorWeightStrategy,
      priorWeightApplied: prior.applied,
      priorMeanStrategy: s.priorMeanStrategy,
      epv: moments.epv,
      vhm: moments.vhm,
      starShares: moments.starShares,
      priorVariance,
      pooledWithinVariance: pooledWithin,
      helpfulZ: s.helpfulZ,
      halfLifeDays: s.halfLifeDays,
      recentWindowDays: s.recentWindowDays,
      staleAfterDays: s.staleAfterDays,
      thinEvidenceThreshold: thinThreshold,
      clusterWindowDays: s.clusterWindowDays,
      clusterBaselineDays: s.clusterBaselineDays,
      clusterPValue: s.clusterPValue,
      clusterMinCount: s.clusterMinCount,
      clusterPhrases: s.clusterPhrases,
      whatItTakesStars: v,
      moverThreshold: s.moverThreshold,
      topOverlapDepth: s.topOverlapDepth,
      rboP: s.rboP,
      notes,
    },
  };
}
