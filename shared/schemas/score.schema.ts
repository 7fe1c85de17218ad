import { z } from 'zod';
import { readInstant } from '../clock';
import { keyOf } from '../keys';
import { priorMeanStrategies, priorWeightStrategies } from '../scoring/settings';

/** Read by the one clock (shared/clock.ts): a date alone is midnight UTC, no offset means UTC. */
export const isoDateSchema = z.string({ error: 'must be an ISO 8601 date' }).superRefine((value, ctx) => {
  const read = readInstant(value);
  if (!read.ok) ctx.addIssue({ code: 'custom', message: read.reason });
});

const count = z
  .number({ error: 'must be a number' })
  .int('must be a whole number')
  .min(0, 'must be 0 or more');
const mean = z
  .number({ error: 'must be a number' })
  .min(1, 'must be between 1 and 5')
  .max(5, 'must be between 1 and 5');
const stars = z
  .number({ error: 'must be a number' })
  .int('must be a whole number from 1 to 5')
  .min(1, 'must be a whole number from 1 to 5')
  .max(5, 'must be a whole number from 1 to 5');

export const starHistogramSchema = z.tuple([count, count, count, count, count], {
  error: 'must list five counts, one-star first',
});

export const reviewInputSchema = z.object({
  stars,
  reviewedAt: isoDateSchema,
  helpfulYes: count.optional(),
  helpfulNo: count.optional(),
  reviewerScore: z.number().min(0, 'must be between 0 and 1').max(1, 'must be between 0 and 1').nullish(),
  text: z.string().max(20_000, 'must be at most 20000 characters').nullish(),
});

/**
 * One item in one of three forms: count + mean, a 1..5 star histogram (count and mean optional,
 * checked against it), or individual reviews.
 */
export const scoreItemInputSchema = z
  .object({
    sku: z
      .string({ error: 'is required' })
      .overwrite(keyOf)
      .min(1, 'is required')
      .max(120, 'must be at most 120 characters'),
    title: z.string().max(300, 'must be at most 300 characters').nullish(),
    count: count.nullish(),
    mean: mean.nullish(),
    histogram: starHistogramSchema.nullish(),
    reviews: z.array(reviewInputSchema).nullish(),
  })
  .superRefine((item, ctx) => {
    if (item.reviews) {
      for (const key of ['count', 'mean', 'histogram'] as const) {
        if (item[key] !== undefined && item[key] !== null) {
          ctx.addIssue({ code: 'custom', path: [key], message: 'cannot be given together with reviews' });
        }
      }
      return;
    }
    if (item.histogram) {
      const total = item.histogram.reduce((a, b) => a + b, 0);
      if (item.count !== undefined && item.count !== null && item.count !== total) {
        ctx.addIssue({
          code: 'custom',
          path: ['histogram'],
          message: `counts add up to ${total}, not the count ${item.count}`,
        });
      }
      return;
    }
    if (item.count === undefined || item.count === null) {
      ctx.addIssue({
        code: 'custom',
        path: ['count'],
        message: 'is required unless a histogram or reviews are given',
      });
    } else if (item.count > 0 && (item.mean === undefined || item.mean === null)) {
      ctx.addIssue({ code: 'custom', path: ['mean'], message: 'is required when count is above 0' });
    }
  });

const positive = z.number({ error: 'must be a number' }).positive('must be above 0');
const nonNegative = z.number({ error: 'must be a number' }).min(0, 'must be 0 or more');

export const scoringSettingsSchema = z
  .object({
    priorWeightStrategy: z.enum(priorWeightStrategies, {
      error: `must be one of ${priorWeightStrategies.join(', ')}`,
    }),
    priorWeightValue: nonNegative.nullable(),
    priorMeanStrategy: z.enum(priorMeanStrategies, {
      error: `must be one of ${priorMeanStrategies.join(', ')}`,
    }),
    priorMeanValue: mean.nullable(),
    z: nonNegative.max(10, 'must be at most 10'),
    helpfulZ: nonNegative.max(10, 'must be at most 10'),
    halfLifeDays: positive,
    recentWindowDays: positive,
    staleAfterDays: positive,
    thinEvidenceThreshold: nonNegative.nullable(),
    clusterWindowDays: positive,
    clusterBaselineDays: positive,
    clusterPValue: positive.max(0.5, 'must be at most 0.5'),
    clusterMinCount: count,
    clusterPhrases: z.array(z.string().trim().min(1, 'must not be empty').max(80)).max(50),
    whatItTakesStars: mean,
    moverThreshold: positive,
    topOverlapDepth: count.min(1, 'must be 1 or more'),
    rboP: positive.max(0.999, 'must be below 1'),
  })
  .partial()
  .superRefine((s, ctx) => {
    if (
      s.priorWeightStrategy === 'fixed' &&
      (s.priorWeightValue === undefined || s.priorWeightValue === null)
    ) {
      ctx.addIssue({
        code: 'custom',
        path: ['priorWeightValue'],
        message: 'is required for the fixed strategy',
      });
    }
    if (s.priorMeanStrategy === 'fixed' && (s.priorMeanValue === undefined || s.priorMeanValue === null)) {
      ctx.addIssue({
        code: 'custom',
        path: ['priorMeanValue'],
        message: 'is required for the fixed strategy',
      });
    }
  });

export const previousRankingEntrySchema = z.object({
  sku: z.string().overwrite(keyOf).min(1, 'is required'),
  naiveRank: count.min(1, 'must be 1 or more'),
  smoothedRank: count.min(1, 'must be 1 or more'),
});

/** Most scored items one answer of POST /api/score carries (about 9 MB of JSON); the rest are pages. */
export const SCORE_PAGE_MAX = 10_000;

export const scoreRequestSchema = z
  .object({
    items: z
      .array(scoreItemInputSchema, { error: 'must be a list of items' })
      .min(1, 'a category needs at least one item')
      .max(200_000, 'at most 200000 items per request'),
    settings: scoringSettingsSchema.optional(),
    asOf: isoDateSchema.optional(),
    previous: z.array(previousRankingEntrySchema).optional(),
    offset: z.number().int('must be a whole number').min(0, 'must be 0 or more').optional(),
    limit: z
      .number()
      .int('must be a whole number')
      .min(1, 'must be 1 or more')
      .max(SCORE_PAGE_MAX, `must be at most ${SCORE_PAGE_MAX}`)
      .optional(),
  })
  .superRefine((req, ctx) => {
    const seen = new Map<string, number>();
    req.items.forEach((item, i) => {
      const first = seen.get(item.sku);
      if (first !== undefined) {
        ctx.addIssue({
          code: 'custom',
          path: ['items', i, 'sku'],
          message: `repeats the sku of items.${first}`,
        });
      } else seen.set(item.sku, i);
    });
  });

export type ScoreRequest = z.infer<typeof scoreRequestSchema>;
export type ScoreItemInput = z.infer<typeof scoreItemInputSchema>;

const nullableNumber = z.number().nullable();
const histogramOut = z.tuple([z.number(), z.number(), z.number(), z.number(), z.number()]);

export const itemResultSchema = z.strictObject({
  sku: z.string(),
  title: z.string().nullable(),
  n: z.number(),
  rawMean: nullableNumber,
  smoothed: z.number(),
  lowerBound: z.number(),
  lowerBoundBasis: z.enum(['histogram', 'pooled-variance', 'variance-bound']),
  naiveRank: z.number().int(),
  smoothedRank: z.number().int(),
  naivePosition: z.number().int(),
  smoothedPosition: z.number().int(),
  drift: z.number().int(),
  naiveMovement: nullableNumber,
  smoothedMovement: nullableNumber,
  newestAgeDays: nullableNumber,
  medianAgeDays: nullableNumber,
  recentShare: nullableNumber,
  decayedMean: nullableNumber,
  effectiveCount: nullableNumber,
  stale: z.boolean().nullable(),
  staleReason: z.string().nullable(),
  helpfulWeightedMean: nullableNumber,
  mostHelpfulStars: nullableNumber,
  mostHelpfulAt: z.string().nullable(),
  reviewerWeightedMean: nullableNumber,
  oneStarShare: nullableNumber,
  thin: z.boolean(),
  negativeCluster: z.boolean().nullable(),
  clusterReason: z.string().nullable(),
  clusterObserved: nullableNumber,
  clusterExpected: nullableNumber,
  clusterPValue: nullableNumber,
  recurringPhrases: z.array(z.strictObject({ phrase: z.string(), count: z.number().int() })),
  whatItTakes: z.enum(['top', 'reviews', 'impossible']),
  reviewsToPass: nullableNumber,
  aboveSku: z.string().nullable(),
  aboveScore: nullableNumber,
});

export const categoryFiguresSchema = z.strictObject({
  itemCount: z.number().int(),
  reviewCount: z.number(),
  meanCount: z.number(),
  medianCount: z.number(),
  weightedMean: nullableNumber,
  spearmanRho: nullableNumber,
  kendallTauB: nullableNumber,
  meanAbsDrift: z.number(),
  maxAbsDrift: z.number(),
  topOverlap: z.strictObject({ depth: z.number().int(), shared: z.number().int(), share: z.number() }),
  rbo: z.strictObject({
    p: z.number(),
    depth: z.number().int(),
    truncated: z.number(),
    extrapolated: z.number(),
  }),
  staleCount: z.number().int(),
  thinCount: z.number().int(),
  negativeClusterCount: z.number().int(),
  previousMatched: z.number().int().nullable(),
  movers: z.array(
    z.strictObject({ sku: z.string(), naiveMovement: z.number().int(), smoothedMovement: z.number().int() }),
  ),
});

export const resolvedParametersSchema = z.strictObject({
  asOf: z.string(),
  m: z.number(),
  C: z.number(),
  z: z.number(),
  priorWeightStrategy: z.enum(priorWeightStrategies),
  priorWeightApplied: z.enum(priorWeightStrategies),
  priorMeanStrategy: z.enum(priorMeanStrategies),
  epv: nullableNumber,
  vhm: nullableNumber,
  starShares: histogramOut.nullable(),
  priorVariance: z.number(),
  pooledWithinVariance: nullableNumber,
  helpfulZ: z.number(),
  halfLifeDays: z.number(),
  recentWindowDays: z.number(),
  staleAfterDays: z.number(),
  thinEvidenceThreshold: z.number(),
  clusterWindowDays: z.number(),
  clusterBaselineDays: z.number(),
  clusterPValue: z.number(),
  clusterMinCount: z.number(),
  clusterPhrases: z.array(z.string()),
  whatItTakesStars: z.number(),
  moverThreshold: z.number(),
  topOverlapDepth: z.number().int(),
  rboP: z.number(),
  notes: z.array(z.string()),
});

export const scoreResponseSchema = z.strictObject({
  items: z.array(itemResultSchema),
  category: categoryFiguresSchema,
  resolved: resolvedParametersSchema,
  /** Which slice of the scored items this answer holds; the API always says, the command gives all. */
  page: z
    .strictObject({ offset: z.number().int(), limit: z.number().int(), total: z.number().int() })
    .optional(),
});

export type ScoreResponse = z.infer<typeof scoreResponseSchema>;

/** One line per issue, as a 400 answer lists them: "items.3.mean: must be between 1 and 5". */
export function describeIssues(error: z.ZodError): string[] {
  return error.issues.map((issue) => `${issue.path.map(String).join('.') || '(body)'}: ${issue.message}`);
}
