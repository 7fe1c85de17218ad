export { calibrate, searchPriorWeight } from './calibration';
export type {
  CalibrationOptions,
  CalibrationResult,
  CurveStep,
  PriorWeightLines,
  PriorWeightSearch,
  PriorWeightSearchOptions,
  PriorWeightStep,
  StrategyOnCurve,
  UnexplainedItem,
} from './calibration';
export { ScoringInputError } from './errors';
export type { ScoringInputErrorCode } from './errors';
export { categoryMoments, priorWeightFor, resolvePrior } from './prior';
export type { CategoryMoments, ResolvedPrior } from './prior';
export {
  averageRanks,
  competitionRanks,
  kendallParts,
  kendallPartsOfRanks,
  kendallTauB,
  orderByScore,
  pearson,
  rankBiasedOverlap,
  spearmanRho,
  spearmanRhoOfRanks,
  topOverlap,
} from './rank-stats';
export type { KendallParts, RankBiasedOverlap } from './rank-stats';
export { scoreCategory } from './score-category';
export type { ScoreOptions } from './score-category';
export { scoreRequest } from './score-request';
export { defaultSettings, priorMeanStrategies, priorWeightStrategies, resolveSettings } from './settings';
export type { PriorMeanStrategy, PriorWeightStrategy, ScoringSettings } from './settings';
export { reviewsToPass, smoothedScore } from './smoothing';
export {
  binomialUpperTail,
  conditionalRateTest,
  median,
  normalCdf,
  normalQuantile,
  wilsonInterval,
  wilsonLowerBound,
} from './stats';
export { summariseReviews, toColumns } from './summary';
export type { EvidenceColumns, SummarySettings } from './summary';
export type * from './types';
export {
  defaultRankIntervalOptions,
  meanDrawer,
  posteriorKinds,
  posteriorPlan,
  rankDraw,
  sampleRankIntervals,
  scoreWithRankIntervals,
  smoothedListing,
} from './rank-intervals';
export type { MeanDrawer, PosteriorPlan, RankIntervalOptions, RankIntervalResult } from './rank-intervals';
export { mulberry32 } from './random';
