import { ScoringInputError } from './errors';

export const priorWeightStrategies = [
  'mean',
  'median',
  'max',
  'min',
  'total',
  'fixed',
  'credibility',
] as const;
export type PriorWeightStrategy = (typeof priorWeightStrategies)[number];

export const priorMeanStrategies = ['weighted', 'fixed'] as const;
export type PriorMeanStrategy = (typeof priorMeanStrategies)[number];

export interface ScoringSettings {
  priorWeightStrategy: PriorWeightStrategy;
  /** Used when priorWeightStrategy is 'fixed'. */
  priorWeightValue: number | null;
  priorMeanStrategy: PriorMeanStrategy;
  /** Used when priorMeanStrategy is 'fixed'. */
  priorMeanValue: number | null;
  /** Standard deviations subtracted for the lower-bound score. */
  z: number;
  /** z of the Wilson interval whose lower bound weights a review by helpfulness. */
  helpfulZ: number;
  halfLifeDays: number;
  recentWindowDays: number;
  staleAfterDays: number;
  /** Null: a quarter of the category's mean review count. */
  thinEvidenceThreshold: number | null;
  clusterWindowDays: number;
  /** Length of the trailing baseline immediately before the cluster window. */
  clusterBaselineDays: number;
  clusterPValue: number;
  clusterMinCount: number;
  clusterPhrases: string[];
  whatItTakesStars: number;
  moverThreshold: number;
  topOverlapDepth: number;
  rboP: number;
}

export const defaultSettings: Readonly<ScoringSettings> = Object.freeze({
  priorWeightStrategy: 'mean',
  priorWeightValue: null,
  priorMeanStrategy: 'weighted',
  priorMeanValue: null,
  z: 1.65,
  helpfulZ: 1.96,
  halfLifeDays: 180,
  recentWindowDays: 90,
  // Common practice, no single source: about one product generation in fast-moving categories.
  staleAfterDays: 365,
  thinEvidenceThreshold: null,
  // Common practice: a quarter is long enough to collect reviews, short enough to catch a batch defect.
  clusterWindowDays: 90,
  clusterBaselineDays: 365,
  clusterPValue: 0.01,
  clusterMinCount: 3,
  clusterPhrases: [] as string[],
  whatItTakesStars: 5,
  moverThreshold: 3,
  topOverlapDepth: 10,
  rboP: 0.9,
} satisfies ScoringSettings);

function positive(value: number, path: string, allowZero = false): void {
  if (!Number.isFinite(value) || value < 0 || (!allowZero && value === 0)) {
    throw new ScoringInputError(
      'settings-invalid',
      `settings.${path}`,
      allowZero ? 'must be 0 or more' : 'must be above 0',
    );
  }
}

export function resolveSettings(partial: Partial<ScoringSettings> = {}): ScoringSettings {
  const defined = Object.fromEntries(Object.entries(partial).filter(([, v]) => v !== undefined));
  const s: ScoringSettings = {
    ...defaultSettings,
    clusterPhrases: [...defaultSettings.clusterPhrases],
    ...defined,
  };
  if (!priorWeightStrategies.includes(s.priorWeightStrategy)) {
    throw new ScoringInputError('settings-invalid', 'settings.priorWeightStrategy', 'unknown strategy');
  }
  if (!priorMeanStrategies.includes(s.priorMeanStrategy)) {
    throw new ScoringInputError('settings-invalid', 'settings.priorMeanStrategy', 'unknown strategy');
  }
  if (s.priorWeightStrategy === 'fixed') {
    if (s.priorWeightValue === null) {
      throw new ScoringInputError(
        'settings-invalid',
        'settings.priorWeightValue',
        'required for the fixed strategy',
      );
    }
    positive(s.priorWeightValue, 'priorWeightValue', true);
  }
  if (s.priorMeanStrategy === 'fixed') {
    const c = s.priorMeanValue;
    if (c === null || !Number.isFinite(c) || c < 1 || c > 5) {
      throw new ScoringInputError('settings-invalid', 'settings.priorMeanValue', 'must be between 1 and 5');
    }
  }
  positive(s.z, 'z', true);
  positive(s.helpfulZ, 'helpfulZ', true);
  positive(s.halfLifeDays, 'halfLifeDays');
  positive(s.recentWindowDays, 'recentWindowDays');
  positive(s.staleAfterDays, 'staleAfterDays');
  if (s.thinEvidenceThreshold !== null) positive(s.thinEvidenceThreshold, 'thinEvidenceThreshold', true);
  positive(s.clusterWindowDays, 'clusterWindowDays');
  positive(s.clusterBaselineDays, 'clusterBaselineDays');
  if (!(s.clusterPValue > 0 && s.clusterPValue < 1)) {
    throw new ScoringInputError('settings-invalid', 'settings.clusterPValue', 'must be between 0 and 1');
  }
  positive(s.clusterMinCount, 'clusterMinCount', true);
  if (!(s.whatItTakesStars >= 1 && s.whatItTakesStars <= 5)) {
    throw new ScoringInputError('settings-invalid', 'settings.whatItTakesStars', 'must be between 1 and 5');
  }
  positive(s.moverThreshold, 'moverThreshold');
  if (!Number.isInteger(s.topOverlapDepth) || s.topOverlapDepth < 1) {
    throw new ScoringInputError(
      'settings-invalid',
      'settings.topOverlapDepth',
      'must be a whole number of 1 or more',
    );
  }
  if (!(s.rboP > 0 && s.rboP < 1)) {
    throw new ScoringInputError('settings-invalid', 'settings.rboP', 'must be between 0 and 1');
  }
  return s;
}
