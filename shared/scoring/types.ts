import type { PriorMeanStrategy, PriorWeightStrategy } from './settings';

/** Counts of 1..5-star reviews, index 0 holding the one-star count. */
export type StarHistogram = readonly [number, number, number, number, number];

export interface ReviewInput {
  stars: number;
  /** ISO 8601 string or Date. Reviews after the cut-off are left out. */
  reviewedAt: string | Date;
  helpfulYes?: number;
  helpfulNo?: number;
  /** 0..1, where the source grades its reviewers. */
  reviewerScore?: number | null;
  text?: string | null;
}

/**
 * What the downstream scoring needs from an item's reviews, as the server's SQL can produce it.
 * Review-level fields are null when the input did not carry them (counts or a histogram only).
 * Windows and weights follow the settings and the cut-off the summary was made for.
 */
export interface EvidenceSummary {
  n: number;
  sumStars: number;
  histogram: StarHistogram | null;
  newestAt: string | null;
  medianAgeDays: number | null;
  /** Reviews younger than recentWindowDays. */
  recentCount: number | null;
  /** Sums over reviews of w = 0.5^(age/halfLifeDays), w*stars and w^2. */
  decayWeightSum: number | null;
  decayWeightedStarSum: number | null;
  decayWeightSqSum: number | null;
  /** Sums over reviews of the Wilson lower bound of helpful share (helpfulZ) and of it times stars. */
  helpfulWeightSum: number | null;
  helpfulWeightedStarSum: number | null;
  mostHelpfulStars: number | null;
  mostHelpfulAt: string | null;
  /** Over reviews with a reviewer score only; null when none has one. */
  reviewerWeightSum: number | null;
  reviewerWeightedStarSum: number | null;
  /** Cluster window: age < clusterWindowDays. Baseline: the clusterBaselineDays before it. */
  oneStarRecent: number | null;
  totalRecent: number | null;
  oneStarBaseline: number | null;
  totalBaseline: number | null;
  /** Per configured phrase: how many one-star reviews in the cluster window contain it. */
  phraseCounts: Record<string, number> | null;
}

export interface ItemIdentity {
  sku: string;
  title?: string | null;
}

export interface CountMeanInput extends ItemIdentity {
  count: number;
  /** Null or absent only when count is 0. */
  mean?: number | null;
}

export interface HistogramInput extends ItemIdentity {
  histogram: StarHistogram;
  count?: number | null;
  mean?: number | null;
}

export interface ReviewsInput extends ItemIdentity {
  reviews: readonly ReviewInput[];
}

export type ItemSummary = ItemIdentity & EvidenceSummary;

export type ItemInput = CountMeanInput | HistogramInput | ReviewsInput | ItemSummary;

export interface PreviousRankingEntry {
  sku: string;
  naiveRank: number;
  smoothedRank: number;
}

export type LowerBoundBasis = 'histogram' | 'pooled-variance' | 'variance-bound';
export type WhatItTakesStatus = 'top' | 'reviews' | 'impossible';

export interface ItemResult {
  sku: string;
  title: string | null;
  n: number;
  rawMean: number | null;
  smoothed: number;
  lowerBound: number;
  lowerBoundBasis: LowerBoundBasis;
  naiveRank: number;
  smoothedRank: number;
  /** 1-based places in the tie-broken listings. */
  naivePosition: number;
  smoothedPosition: number;
  /** naiveRank - smoothedRank: positive when smoothing lifts the item. */
  drift: number;
  /** previous rank - current rank: positive when the item moved up. Null without a previous ranking. */
  naiveMovement: number | null;
  smoothedMovement: number | null;
  newestAgeDays: number | null;
  medianAgeDays: number | null;
  recentShare: number | null;
  decayedMean: number | null;
  effectiveCount: number | null;
  stale: boolean | null;
  staleReason: string | null;
  helpfulWeightedMean: number | null;
  mostHelpfulStars: number | null;
  mostHelpfulAt: string | null;
  reviewerWeightedMean: number | null;
  oneStarShare: number | null;
  thin: boolean;
  negativeCluster: boolean | null;
  clusterReason: string | null;
  /** One-star reviews in the cluster window. */
  clusterObserved: number | null;
  /**
   * One-star reviews the window would hold if the rate had not changed: the one-star reviews of
   * window and baseline together times the window's share of their reviews.
   */
  clusterExpected: number | null;
  /** One-sided exact conditional p-value (Przyborowski & Wilenski 1940) of that many or more. */
  clusterPValue: number | null;
  recurringPhrases: { phrase: string; count: number }[];
  whatItTakes: WhatItTakesStatus;
  /** Smallest number of new reviews at whatItTakesStars that lifts the item above aboveSku. */
  reviewsToPass: number | null;
  aboveSku: string | null;
  aboveScore: number | null;
}

export interface Mover {
  sku: string;
  naiveMovement: number;
  smoothedMovement: number;
}

export interface CategoryFigures {
  itemCount: number;
  reviewCount: number;
  meanCount: number;
  medianCount: number;
  weightedMean: number | null;
  spearmanRho: number | null;
  kendallTauB: number | null;
  meanAbsDrift: number;
  maxAbsDrift: number;
  topOverlap: { depth: number; shared: number; share: number };
  rbo: { p: number; depth: number; truncated: number; extrapolated: number };
  staleCount: number;
  thinCount: number;
  negativeClusterCount: number;
  /** Items matched in the previous ranking; null without one. */
  previousMatched: number | null;
  movers: Mover[];
}

export interface ResolvedParameters {
  asOf: string;
  m: number;
  C: number;
  z: number;
  priorWeightStrategy: PriorWeightStrategy;
  /** Strategy actually applied, after any documented fallback. */
  priorWeightApplied: PriorWeightStrategy;
  priorMeanStrategy: PriorMeanStrategy;
  /** Bühlmann expected process variance and variance of hypothetical means, when estimable. */
  epv: number | null;
  vhm: number | null;
  starShares: StarHistogram | null;
  priorVariance: number;
  pooledWithinVariance: number | null;
  helpfulZ: number;
  halfLifeDays: number;
  recentWindowDays: number;
  staleAfterDays: number;
  thinEvidenceThreshold: number;
  clusterWindowDays: number;
  clusterBaselineDays: number;
  clusterPValue: number;
  clusterMinCount: number;
  clusterPhrases: string[];
  whatItTakesStars: number;
  moverThreshold: number;
  topOverlapDepth: number;
  rboP: number;
  notes: string[];
}

export interface ScoreResult {
  items: ItemResult[];
  category: CategoryFigures;
  resolved: ResolvedParameters;
}
