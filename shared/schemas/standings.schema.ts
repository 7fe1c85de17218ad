import { z } from 'zod';
import { priorMeanStrategies, priorWeightStrategies } from '../scoring/settings';
import { isoWeekSchema } from './iso-week.schema';

export const weekQuerySchema = z.object({ week: isoWeekSchema.optional() });
export type WeekQuery = z.infer<typeof weekQuerySchema>;

/**
 * New reviews that would lift an item above the next: a whole number that may pass 2^53, where
 * z.number().int() would refuse it (see reviewsToPass in shared/scoring/smoothing.ts).
 */
const reviewsNeededSchema = z.number().min(1).multipleOf(1);

/** Columns the standings may be sorted by; anything else is refused before it reaches SQL. */
export const standingsSortColumns = [
  'smoothedRank',
  'naiveRank',
  'drift',
  'absDrift',
  'n',
  'rawMean',
  'smoothed',
  'lowerBound',
  'newestAgeDays',
  'smoothedMovement',
  'rankRange',
  'sku',
  'title',
] as const;
export type StandingsSort = (typeof standingsSortColumns)[number];

export const standingsFlags = ['stale', 'thin', 'cluster', 'mover'] as const;
export type StandingsFlag = (typeof standingsFlags)[number];

export const standingsQuerySchema = z.object({
  week: isoWeekSchema.optional(),
  sort: z.enum(standingsSortColumns).default('smoothedRank'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  /** Comma-separated; an item must carry every flag named. */
  flags: z
    .string()
    .regex(/^(stale|thin|cluster|mover)(,(stale|thin|cluster|mover))*$/, 'Use stale, thin, cluster or mover.')
    .optional(),
  q: z.string().trim().max(100).optional(),
  driftMin: z.coerce.number().int().min(-100000).max(100000).optional(),
  driftMax: z.coerce.number().int().min(-100000).max(100000).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type StandingsQuery = z.infer<typeof standingsQuerySchema>;
export type StandingsQueryInput = z.input<typeof standingsQuerySchema>;

export const weekSummarySchema = z.object({
  isoWeek: z.string(),
  cutoff: z.string(),
  takenAt: z.string(),
  itemCount: z.number().int(),
  reviewCount: z.number().int(),
  spearmanRho: z.number().nullable(),
  kendallTauB: z.number().nullable(),
  meanAbsDrift: z.number(),
  staleShare: z.number(),
  thinShare: z.number(),
  clusterCount: z.number().int(),
});
export type WeekSummary = z.infer<typeof weekSummarySchema>;

export const portfolioEntrySchema = z.object({
  slug: z.string(),
  name: z.string(),
  description: z.string(),
  latest: weekSummarySchema.nullable(),
  /** Oldest first, the latest week last. */
  trend: z.array(weekSummarySchema),
});
export type PortfolioEntry = z.infer<typeof portfolioEntrySchema>;
export const portfolioSchema = z.array(portfolioEntrySchema);

export const categoryWeeksSchema = z.array(weekSummarySchema);

export const standingsRowSchema = z.object({
  sku: z.string(),
  title: z.string(),
  n: z.number().int(),
  rawMean: z.number().nullable(),
  smoothed: z.number(),
  lowerBound: z.number(),
  naiveRank: z.number().int(),
  smoothedRank: z.number().int(),
  drift: z.number().int(),
  naiveMovement: z.number().int().nullable(),
  smoothedMovement: z.number().int().nullable(),
  newestAgeDays: z.number().nullable(),
  recentShare: z.number().nullable(),
  oneStarShare: z.number().nullable(),
  stale: z.boolean().nullable(),
  thin: z.boolean(),
  negativeCluster: z.boolean().nullable(),
  mover: z.boolean(),
  staleReason: z.string().nullable(),
  clusterReason: z.string().nullable(),
  reviewsToPass: reviewsNeededSchema.nullable(),
  /** 90 % rank range of the smoothed rank and its median; null on snapshots taken before they existed. */
  rankLow: z.number().int().nullable(),
  rankMedian: z.number().int().nullable(),
  rankHigh: z.number().int().nullable(),
  topShare: z.number().nullable(),
  aboveAheadShare: z.number().nullable(),
});
export type StandingsRow = z.infer<typeof standingsRowSchema>;

export const standingsSchema = z.object({
  week: weekSummarySchema,
  m: z.number(),
  /** The strategy the category asks for, and the one that set m (they differ after a fallback). */
  priorWeightStrategy: z.enum(priorWeightStrategies),
  priorWeightApplied: z.enum(priorWeightStrategies),
  C: z.number(),
  thinThreshold: z.number(),
  staleAfterDays: z.number(),
  moverThreshold: z.number(),
  /** Level, draws S and seed of the rank ranges; null for weeks taken before they existed. */
  rankIntervals: z.object({ level: z.number(), draws: z.number().int(), seed: z.number().int() }).nullable(),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
  rows: z.array(standingsRowSchema),
});
export type Standings = z.infer<typeof standingsSchema>;

/** Every item of a week as parallel arrays: compact enough for a 5,000-point chart. */
export const driftChartSchema = z.object({
  isoWeek: z.string(),
  skus: z.array(z.string()),
  titles: z.array(z.string()),
  naive: z.array(z.number().int()),
  smoothed: z.array(z.number().int()),
  n: z.array(z.number().int()),
});
export type DriftChart = z.infer<typeof driftChartSchema>;

export const freshnessSchema = z.object({
  isoWeek: z.string(),
  staleAfterDays: z.number(),
  buckets: z.array(
    z.object({ label: z.string(), from: z.number(), to: z.number().nullable(), count: z.number().int() }),
  ),
  unknownAge: z.number().int(),
  staleTotal: z.number().int(),
  stale: z.array(
    z.object({
      sku: z.string(),
      title: z.string(),
      n: z.number().int(),
      smoothedRank: z.number().int(),
      newestAgeDays: z.number().nullable(),
      newestAt: z.string().nullable(),
    }),
  ),
});
export type Freshness = z.infer<typeof freshnessSchema>;

export const itemFlagSchema = z.object({
  flag: z.enum(standingsFlags),
  on: z.boolean(),
  reason: z.string(),
});

export const itemDetailSchema = z.object({
  sku: z.string(),
  title: z.string(),
  category: z.object({ slug: z.string(), name: z.string() }),
  isoWeek: z.string().nullable(),
  timeline: z.array(
    z.object({
      isoWeek: z.string(),
      cutoff: z.string(),
      itemCount: z.number().int(),
      naiveRank: z.number().int().nullable(),
      smoothedRank: z.number().int().nullable(),
      n: z.number().int().nullable(),
      rawMean: z.number().nullable(),
      smoothed: z.number().nullable(),
      lowerBound: z.number().nullable(),
      decayedMean: z.number().nullable(),
      helpfulMean: z.number().nullable(),
      /** The week's rank range of the smoothed rank; null before rank intervals existed. */
      rankLow: z.number().int().nullable(),
      rankHigh: z.number().int().nullable(),
      rankLevel: z.number().nullable(),
    }),
  ),
  current: z
    .object({
      n: z.number().int(),
      sumStars: z.number(),
      rawMean: z.number().nullable(),
      smoothed: z.number(),
      lowerBound: z.number(),
      naiveRank: z.number().int(),
      smoothedRank: z.number().int(),
      drift: z.number().int(),
      itemCount: z.number().int(),
      histogram: z.array(z.number().int()).nullable(),
      newestAt: z.string().nullable(),
      newestAgeDays: z.number().nullable(),
      medianAgeDays: z.number().nullable(),
      recentShare: z.number().nullable(),
      decayedMean: z.number().nullable(),
      effectiveCount: z.number().nullable(),
      helpfulMean: z.number().nullable(),
      oneStarShare: z.number().nullable(),
      flags: z.array(itemFlagSchema),
      recurringPhrases: z.array(z.object({ phrase: z.string(), count: z.number().int() })),
      m: z.number(),
      priorWeightStrategy: z.enum(priorWeightStrategies),
      priorWeightApplied: z.enum(priorWeightStrategies),
      C: z.number(),
      halfLifeDays: z.number(),
      whatItTakesStars: z.number(),
      above: z.object({ sku: z.string(), title: z.string().nullable(), smoothed: z.number() }).nullable(),
      reviewsToPass: reviewsNeededSchema.nullable(),
    })
    .nullable(),
  helpfulReviews: z.array(
    z.object({
      stars: z.number().int(),
      reviewedAt: z.string(),
      helpfulYes: z.number().int(),
      helpfulNo: z.number().int(),
      verified: z.boolean().nullable(),
      body: z.string().nullable(),
    }),
  ),
});
export type ItemDetail = z.infer<typeof itemDetailSchema>;

export const whatIfQuerySchema = z.object({
  week: isoWeekSchema.optional(),
  halfLifeDays: z.coerce.number().positive().max(100000).optional(),
});
export type WhatIfQuery = z.infer<typeof whatIfQuerySchema>;

/** The settings an analyst may change; the full ScoringSettings of shared/scoring, all optional. */
export const scoringSettingsSchema = z
  .object({
    priorWeightStrategy: z.enum(priorWeightStrategies),
    priorWeightValue: z.number().min(0).max(1e9).nullable(),
    priorMeanStrategy: z.enum(priorMeanStrategies),
    priorMeanValue: z.number().min(1).max(5).nullable(),
    z: z.number().min(0).max(10),
    helpfulZ: z.number().min(0).max(10),
    halfLifeDays: z.number().positive().max(100000),
    recentWindowDays: z.number().positive().max(100000),
    staleAfterDays: z.number().positive().max(100000),
    thinEvidenceThreshold: z.number().min(0).max(1e9).nullable(),
    clusterWindowDays: z.number().positive().max(100000),
    clusterBaselineDays: z.number().positive().max(100000),
    clusterPValue: z.number().gt(0).lt(1),
    clusterMinCount: z.number().min(0).max(100000),
    clusterPhrases: z.array(z.string().trim().min(1).max(80)).max(40),
    whatItTakesStars: z.number().min(1).max(5),
    moverThreshold: z.number().positive().max(100000),
    topOverlapDepth: z.number().int().min(1).max(1000),
    rboP: z.number().gt(0).lt(1),
  })
  .partial()
  .strict();
export type ScoringSettingsInput = z.infer<typeof scoringSettingsSchema>;

const loose = z.record(z.string(), z.unknown());

export const whatIfEvidenceSchema = z.object({
  isoWeek: z.string(),
  asOf: z.string(),
  /** The category's stored settings over the defaults (a full ScoringSettings). */
  settings: loose,
  /** What the week's snapshot resolved (ResolvedParameters). */
  resolved: loose,
  /** ItemSummary[] of shared/scoring, ready for scoreCategory and calibrate. */
  items: z.array(loose),
  /** The week before, for movements (sku, naiveRank, smoothedRank). */
  previous: z
    .array(z.object({ sku: z.string(), naiveRank: z.number(), smoothedRank: z.number() }))
    .nullable(),
  /** The week's standings as the stored snapshot holds them: the what-if's "saved" side. */
  saved: z.object({
    week: weekSummarySchema,
    rows: z.array(
      z.object({ sku: z.string(), n: z.number(), naiveRank: z.number(), smoothedRank: z.number() }),
    ),
  }),
  /** How today's evidence before the cut-off differs from what the snapshot was taken from. */
  evidenceChange: z.object({
    changed: z.boolean(),
    /** Reviews dated before the cut-off that were stored after the snapshot was taken. */
    lateReviews: z.number().int(),
    itemCountNow: z.number().int(),
    reviewCountNow: z.number().int(),
  }),
  /** Whether the caller may recompute the snapshot (POST /api/jobs/backfill with replace). */
  canRecompute: z.boolean(),
});
export type WhatIfEvidence = z.infer<typeof whatIfEvidenceSchema>;

export const categorySettingsSchema = z.object({
  slug: z.string(),
  stored: loose,
  effective: loose,
  canEdit: z.boolean(),
  updatedAt: z.string().nullable(),
});
export type CategorySettings = z.infer<typeof categorySettingsSchema>;

export const calibrationNoteInputSchema = z.object({
  isoWeek: isoWeekSchema,
  note: z.string().trim().max(2000).default(''),
  observedCount: z.number().int().min(0).max(100000),
  matchedCount: z.number().int().min(0).max(100000),
  unmatched: z.array(z.string().max(120)).max(500),
  C: z.number(),
  best: z.object({
    start: z.number().min(0),
    end: z.number().nullable(),
    point: z.number().min(0),
    tau: z.number().min(-1).max(1).nullable(),
  }),
  strategies: z
    .array(
      z.object({
        strategy: z.enum(priorWeightStrategies),
        m: z.number().nullable(),
        tau: z.number().nullable(),
      }),
    )
    .max(10),
  unexplained: z
    .array(
      z.object({
        sku: z.string().max(120),
        observedPosition: z.number().int(),
        fittedPosition: z.number().int(),
        gap: z.number().int(),
      }),
    )
    .max(50),
});
export type CalibrationNoteInput = z.infer<typeof calibrationNoteInputSchema>;

export const calibrationNoteSchema = calibrationNoteInputSchema.extend({
  id: z.number().int(),
  createdAt: z.string(),
  createdBy: z.string(),
});
export type CalibrationNote = z.infer<typeof calibrationNoteSchema>;
export const calibrationNotesSchema = z.array(calibrationNoteSchema);
