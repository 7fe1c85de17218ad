import type { PriorWeightStrategy } from './scoring/settings';

/**
 * The words Ballast uses for its concepts, in one place: screens, PDF, mail and CSV headers all read them,
 * so the same column is never "Smoothed" on one page and "Score" on another.
 */
export const standingsColumns = {
  smoothedRank: { label: 'Smoothed #', csv: 'smoothed_rank' },
  naiveRank: { label: 'Naive #', csv: 'naive_rank' },
  drift: { label: 'Drift', csv: 'drift' },
  sku: { label: 'SKU', csv: 'sku' },
  title: { label: 'Item', csv: 'title' },
  n: { label: 'Reviews', csv: 'reviews' },
  rawMean: { label: 'Raw mean', csv: 'raw_mean' },
  smoothed: { label: 'Smoothed', csv: 'smoothed' },
  lowerBound: { label: 'Lower bound', csv: 'lower_bound' },
  newestAgeDays: { label: 'Newest review', csv: 'newest_review_age_days' },
  smoothedMovement: { label: 'Smoothed move', csv: 'movement_smoothed' },
  naiveMovement: { label: 'Naive move', csv: 'movement_naive' },
  flags: { label: 'Flags', csv: 'flags' },
  staleReason: { label: 'Why stale', csv: 'stale_reason' },
  clusterReason: { label: 'Why a cluster', csv: 'cluster_reason' },
  priorWeight: { label: 'm', csv: 'prior_weight_m' },
  priorWeightApplied: { label: 'Strategy applied', csv: 'prior_weight_strategy_applied' },
  rankRange: { label: 'Rank range', csv: 'rank_range_90' },
  rankMedian: { label: 'Median rank', csv: 'rank_median' },
  rankLow: { label: 'Rank range from', csv: 'rank_range_from' },
  rankHigh: { label: 'Rank range to', csv: 'rank_range_to' },
  topShare: { label: 'Chance of top 10', csv: 'top10_chance' },
  aboveAheadShare: { label: 'Chance the item above is ahead', csv: 'above_ahead_chance' },
  isoWeek: { label: 'Week', csv: 'iso_week' },
  category: { label: 'Category', csv: 'category' },
  priorMean: { label: 'C', csv: 'prior_mean_c' },
  priorWeightStrategy: { label: 'Strategy asked for', csv: 'prior_weight_strategy' },
} as const;
export type StandingsColumn = keyof typeof standingsColumns;

/** Every on-screen and printed label of a standings column, for the test that keeps labels inside this module. */
export const standingsLabels: ReadonlySet<string> = new Set(
  Object.values(standingsColumns).map((c) => c.label),
);

/** DESIGN §7, word for word wherever a file or screen carries scores without a person beside it. */
export const cautionText = [
  'Scores are estimates from public ratings, not verdicts on a product or a reviewer.',
  'A negative cluster is a reason to read the reviews, not proof of a defect or of manipulation.',
  "Reviewer identifiers are personal data: Ballast stores only what the job needs and never shows them in digests; follow the retailer's policy and local law.",
] as const;

export const terms = {
  spearman: "Spearman's rho",
  kendall: "Kendall's tau-b",
  /** The short forms, for narrow table headers and chart tooltips. */
  spearmanShort: 'rho',
  kendallShort: 'tau-b',
  naiveRanking: 'naive rank',
  smoothedRanking: 'smoothed rank',
  drift: 'Drift = naive rank − smoothed rank',
  ties: 'Ranks use standard competition ranking: tied scores share a rank and the next rank is skipped (1, 2, 2, 4). Within a tie the list shows the item with more reviews first, then by SKU; that order does not change the rank.',
} as const;

/**
 * Rank intervals (shared/scoring/rank-intervals.ts): the words beside a rank and a week's move. A move is
 * clear when last week's and this week's 90 % rank ranges do not overlap: the item's place changed by
 * more than either week's evidence can explain; otherwise it is within the noise.
 */
export const rankWords = {
  range: (low: number, high: number): string => (low === high ? `${low}` : `${low}–${high}`),
  meaning: (level: number): string =>
    `Rank range: with the evidence so far, the item's true place lies in this range with ${Math.round(level * 100)} % probability (5th to 95th percentile of ranks over posterior draws).`,
  clearMove: 'clear move',
  withinNoise: 'within the noise',
  rule: 'A move is clear when the rank ranges of the two weeks do not overlap.',
  chartBand: (level: number): string => `${Math.round(level * 100)} % rank range`,
  pdfTitle: 'How sure each rank is',
} as const;

/** Clear when the two weeks' rank ranges do not overlap; null when either week has none. */
export function moveClarity(
  before: { low: number | null; high: number | null },
  after: { low: number | null; high: number | null },
): 'clear' | 'noise' | null {
  if (before.low === null || before.high === null || after.low === null || after.high === null) return null;
  return before.high < after.low || after.high < before.low ? 'clear' : 'noise';
}

/** What a person calls a field of a form or setting; an error message names this, never a field path. */
export const fieldLabels: Record<string, string> = {
  priorWeightStrategy: 'Prior weight strategy',
  priorWeightValue: 'Prior weight m',
  priorMeanStrategy: 'Prior mean strategy',
  priorMeanValue: 'Prior mean C',
  z: 'Lower bound z',
  helpfulZ: 'Helpfulness z',
  halfLifeDays: 'Recency half-life (days)',
  recentWindowDays: 'Recent window (days)',
  staleAfterDays: 'Stale after (days)',
  thinEvidenceThreshold: 'Thin evidence below (reviews)',
  clusterWindowDays: 'Negative cluster window (days)',
  clusterBaselineDays: 'Negative cluster baseline (days)',
  clusterPValue: 'Negative cluster p-value',
  clusterMinCount: 'Negative cluster minimum count',
  clusterPhrases: 'Watched phrases',
  whatItTakesStars: 'What it would take (stars)',
  moverThreshold: 'Mover threshold (places)',
  topOverlapDepth: 'Top overlap depth',
  rboP: 'Rank-biased overlap p',
  recipients: 'Extra recipients',
  categoryIds: 'Categories',
  cron: 'Cron expression',
  tz: 'Time zone',
  timeZone: 'Time zone',
};

function nameOf(name: string): string {
  const known = fieldLabels[name];
  if (known) return known;
  const words = name.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/**
 * The label of the innermost named field of a path like settings.priorWeightValue or recipients.0; inside
 * a list it says which entry, counted from 1 as a person counts: items.1.mean is "Mean of items entry 2".
 */
export function fieldLabel(path: readonly PropertyKey[]): string | null {
  const at = path.findLastIndex((p) => typeof p === 'string');
  if (at < 0) return null;
  const label = nameOf(path[at] as string);
  const index = path.slice(0, at).findLastIndex((p) => typeof p === 'number');
  const list = index > 0 ? path[index - 1] : undefined;
  if (index < 0 || typeof list !== 'string') return label;
  return `${label} of ${nameOf(list).toLowerCase()} entry ${(path[index] as number) + 1}`;
}

/** "Prior weight m: must be given" for an engine error at settings.priorWeightValue. */
export function inUserWords(path: string, reason: string): string {
  const label = path ? fieldLabel(path.split('.')) : null;
  return label ? `${label}: ${reason}` : reason;
}

/** The name of the start page: a manager sees only their own categories there. */
export const homeLabel = (role: string): string => (role === 'manager' ? 'My categories' : 'Overview');

export const priorWeightStrategyNames: Record<PriorWeightStrategy, string> = {
  mean: 'mean review count',
  median: 'median review count',
  max: 'largest review count',
  min: 'smallest review count',
  total: 'total review count',
  fixed: 'fixed value',
  credibility: 'credibility',
};

/** The strategy that set m, saying so when it is a fallback from the one the category asks for. */
export function priorWeightApplied(p: {
  priorWeightStrategy: PriorWeightStrategy;
  priorWeightApplied: PriorWeightStrategy;
}): string {
  const applied = priorWeightStrategyNames[p.priorWeightApplied];
  if (p.priorWeightApplied === p.priorWeightStrategy) return applied;
  return `${applied}, a fallback: ${priorWeightStrategyNames[p.priorWeightStrategy]} could not be estimated`;
}

/** What each alert rule is called on screen, in mail and in a webhook's text; `{n}` is the rule's threshold. */
export const alertRuleNames = {
  new_cluster: 'New negative cluster',
  fell: 'Fell more than {n} places',
  entered_top: 'Entered the top {n}',
  left_top: 'Left the top {n}',
  went_stale: 'Went stale',
  thin_leader: 'In the top {n} on thin evidence',
} as const;

export function alertRuleName(rule: keyof typeof alertRuleNames, threshold: number | null): string {
  return alertRuleNames[rule].replace('{n}', String(threshold ?? ''));
}

/** DESIGN §7 in the words of an alert mail and a webhook's text. */
export const alertCaution =
  'Scores are estimates from public ratings, not verdicts on a product or a reviewer. A negative cluster is a reason to read the reviews, not proof of a defect or of manipulation.';
