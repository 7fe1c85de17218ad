import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  describeIssues,
  scoreRequestSchema,
  scoreResponseSchema,
} from '../../../shared/schemas/score.schema';
import { ScoringInputError } from '../../../shared/scoring/errors';
import { scoreCategory } from '../../../shared/scoring/score-category';
import { scoreRequest } from '../../../shared/scoring/score-request';
import { defaultSettings, resolveSettings } from '../../../shared/scoring/settings';
import { summariseReviews } from '../../../shared/scoring/summary';
import type { HistogramInput, ItemInput, ReviewInput } from '../../../shared/scoring/types';

const asOf = '2025-03-01T00:00:00Z';
const daysBefore = (days: number) => new Date(Date.parse(asOf) - days * 86_400_000).toISOString();

function errorOf(fn: () => unknown): ScoringInputError {
  try {
    fn();
  } catch (err) {
    if (err instanceof ScoringInputError) return err;
    throw err;
  }
  throw new Error('expected a ScoringInputError');
}

describe('typed input errors', () => {
  const score = (items: ItemInput[]) => () => scoreCategory(items, {}, { asOf });

  it.each([0, 6, 4.5])('rejects a review with %s stars', (stars) => {
    const err = errorOf(score([{ sku: 'a', reviews: [{ stars, reviewedAt: asOf }] }]));
    expect(err).toMatchObject({ code: 'stars-out-of-range', path: 'items.0.reviews.0.stars' });
  });

  it.each([-1, 2.5])('rejects a count of %s', (count) => {
    const err = errorOf(
      score([
        { sku: 'a', count: 1, mean: 4 },
        { sku: 'b', count, mean: 4 },
      ]),
    );
    expect(err).toMatchObject({ code: 'count-invalid', path: 'items.1.count' });
  });

  it.each([0.5, 5.5])('rejects a mean of %s', (mean) => {
    const err = errorOf(score([{ sku: 'a', count: 3, mean }]));
    expect(err).toMatchObject({
      code: 'mean-out-of-range',
      path: 'items.0.mean',
      reason: 'must be between 1 and 5',
    });
    expect(err.message).toBe('items.0.mean: must be between 1 and 5');
  });

  it('rejects an empty category', () => {
    expect(errorOf(score([])).code).toBe('empty-category');
  });

  it('rejects a histogram whose counts do not add up to the count', () => {
    const err = errorOf(score([{ sku: 'a', histogram: [1, 2, 3, 4, 5], count: 16 }]));
    expect(err).toMatchObject({ code: 'histogram-count-mismatch', path: 'items.0.histogram' });
  });

  it('rejects a summary whose histogram does not add up to n', () => {
    const summary = summariseReviews([{ stars: 4, reviewedAt: asOf }], asOf, defaultSettings);
    const err = errorOf(score([{ sku: 'a', ...summary, n: 2, sumStars: 8 }]));
    expect(err.code).toBe('histogram-count-mismatch');
  });

  it('rejects a duplicate sku, a bad date and invalid settings', () => {
    expect(
      errorOf(
        score([
          { sku: 'a', count: 1, mean: 3 },
          { sku: 'a', count: 1, mean: 3 },
        ]),
      ).code,
    ).toBe('duplicate-sku');
    expect(errorOf(score([{ sku: 'a', reviews: [{ stars: 3, reviewedAt: 'last week' }] }])).code).toBe(
      'date-invalid',
    );
    expect(errorOf(() => resolveSettings({ priorWeightStrategy: 'fixed' })).path).toBe(
      'settings.priorWeightValue',
    );
  });
});

describe('defaults', () => {
  it('uses the DESIGN §4 defaults', () => {
    expect(defaultSettings.priorWeightStrategy).toBe('mean');
    expect(defaultSettings.priorMeanStrategy).toBe('weighted');
    expect(defaultSettings.z).toBe(1.65);
    expect(defaultSettings.halfLifeDays).toBe(180);
    expect(defaultSettings.rboP).toBe(0.9);
    expect(defaultSettings.whatItTakesStars).toBe(5);
    expect(defaultSettings.clusterPValue).toBe(0.01);
    expect(defaultSettings.clusterMinCount).toBe(3);
  });

  it('marks a year without reviews stale and looks back 90 days (common practice, no single source)', () => {
    expect(defaultSettings.staleAfterDays).toBe(365);
    expect(defaultSettings.recentWindowDays).toBe(90);
    expect(defaultSettings.clusterWindowDays).toBe(90);
    const res = scoreCategory(
      [
        { sku: 'old', reviews: [{ stars: 5, reviewedAt: daysBefore(366) }] },
        { sku: 'fresh', reviews: [{ stars: 5, reviewedAt: daysBefore(364) }] },
        { sku: 'counts', count: 4, mean: 4 },
      ],
      {},
      { asOf },
    );
    const by = Object.fromEntries(res.items.map((it) => [it.sku, it]));
    expect(by.old!.stale).toBe(true);
    expect(by.fresh!.stale).toBe(false);
    expect(by.counts!.stale).toBeNull();
    expect(by.counts!.staleReason).toBe('review dates not known');
  });

  it('sets the thin-evidence threshold to a quarter of the mean count', () => {
    const res = scoreCategory(
      [
        { sku: 'a', count: 100, mean: 4 },
        { sku: 'b', count: 10, mean: 4 },
        { sku: 'c', count: 9, mean: 4 },
        { sku: 'd', count: 1, mean: 4 },
      ],
      {},
      { asOf },
    );
    expect(res.resolved.thinEvidenceThreshold).toBe(30 / 4);
    expect(res.items.map((it) => it.thin)).toEqual([false, false, false, true]);
  });
});

describe('prior weight strategies', () => {
  const items: HistogramInput[] = [
    { sku: 'a', histogram: [1, 2, 4, 2, 1] },
    { sku: 'b', histogram: [5, 0, 0, 0, 5] },
    { sku: 'c', histogram: [0, 0, 30, 0, 0] },
  ];
  it.each([
    ['mean', 50 / 3],
    ['median', 10],
    ['max', 30],
    ['min', 10],
    ['total', 50],
  ] as const)('resolves %s to %s', (strategy, m) => {
    const res = scoreCategory(items, { priorWeightStrategy: strategy }, { asOf });
    expect(res.resolved.m).toBeCloseTo(m, 12);
    expect(res.resolved.C).toBeCloseTo((30 + 30 + 90) / 50, 12);
  });

  it('computes credibility m = EPV / VHM by the Bühlmann–Straub method of moments', () => {
    const res = scoreCategory(items, { priorWeightStrategy: 'credibility' }, { asOf });
    // Within sums of squares: a = 102 - 90 = 12, b = 130 - 90 = 40, c = 0; EPV pools them over 9 + 9 + 29.
    const epv = (12 + 40 + 0) / 47;
    const r = [3, 3, 3];
    const between = r.reduce((acc, ri, i) => acc + [10, 10, 30][i]! * (ri - 3) ** 2, 0);
    const vhm = (between - 2 * epv) / (50 - (100 + 100 + 900) / 50);
    expect(res.resolved.epv).toBeCloseTo(epv, 12);
    expect(res.resolved.vhm).toBeCloseTo(vhm, 12);
    // All true means look alike (VHM <= 0): the documented fallback is the total count.
    expect(res.resolved.priorWeightApplied).toBe('total');
    expect(res.resolved.m).toBe(50);
    expect(res.resolved.notes.join(' ')).toMatch(/VHM <= 0/);
  });

  it('falls back to the mean count when no histograms give within-item variances', () => {
    const res = scoreCategory(
      [
        { sku: 'a', count: 10, mean: 4 },
        { sku: 'b', count: 30, mean: 3 },
      ],
      { priorWeightStrategy: 'credibility' },
      { asOf },
    );
    expect(res.resolved.priorWeightApplied).toBe('mean');
    expect(res.resolved.m).toBe(20);
    expect(res.items[0]!.lowerBoundBasis).toBe('variance-bound');
  });

  it('uses a fixed prior mean and weight as given', () => {
    const res = scoreCategory(
      [{ sku: 'a', count: 10, mean: 3.5 }],
      { priorWeightStrategy: 'fixed', priorWeightValue: 10, priorMeanStrategy: 'fixed', priorMeanValue: 4 },
      { asOf },
    );
    expect(res.items[0]!.smoothed).toBeCloseTo(3.75, 12);
  });
});

describe('recency and quality from reviews', () => {
  const reviews: ReviewInput[] = [
    // One millisecond before the cut-off: a review at the cut-off itself is not evidence (shared/iso-week.ts).
    { stars: 5, reviewedAt: daysBefore(1 / 86_400_000), helpfulYes: 9, helpfulNo: 1, reviewerScore: 1 },
    { stars: 1, reviewedAt: daysBefore(180), helpfulYes: 0, helpfulNo: 0, reviewerScore: 0.5 },
    { stars: 3, reviewedAt: daysBefore(-5) },
  ];

  it('summarises decay weights 0.5^(age/half-life) and the Kish effective count', () => {
    const s = summariseReviews(reviews, asOf, defaultSettings);
    expect(s.n).toBe(2);
    expect(s.decayWeightSum).toBeCloseTo(1.5, 9);
    expect(s.decayWeightedStarSum).toBeCloseTo(5.5, 9);
    expect(s.decayWeightSqSum).toBeCloseTo(1.25, 9);
    expect(s.medianAgeDays).toBeCloseTo(90, 7);
    expect(s.recentCount).toBe(1);
    const res = scoreCategory([{ sku: 'x', reviews }], {}, { asOf });
    const it0 = res.items[0]!;
    expect(it0.decayedMean).toBeCloseTo(5.5 / 1.5, 9);
    // Kish (1965): (sum w)^2 / sum w^2 = 2.25 / 1.25.
    expect(it0.effectiveCount).toBeCloseTo(1.8, 9);
    expect(it0.newestAgeDays).toBeCloseTo(0, 7);
    expect(it0.recentShare).toBe(0.5);
    // Only the 5-star review has helpful votes, so the helpful-weighted mean is its stars.
    expect(it0.helpfulWeightedMean).toBe(5);
    expect(it0.mostHelpfulStars).toBe(5);
    expect(it0.reviewerWeightedMean).toBeCloseTo((5 * 1 + 1 * 0.5) / 1.5, 12);
  });

  it('flags a negative cluster against the item’s own baseline and lists the recurring phrases', () => {
    const baseline: ReviewInput[] = Array.from({ length: 60 }, (_, i) => ({
      stars: i % 30 === 0 ? 1 : 4 + (i % 2),
      reviewedAt: daysBefore(100 + i * 4),
    }));
    const recent = (ones: number): ReviewInput[] => [
      ...Array.from({ length: ones }, (_, i) => ({
        stars: 1,
        reviewedAt: daysBefore(5 + i),
        text: i % 2 === 0 ? 'The Hinge snapped on day two' : 'hinge snapped, lid loose',
      })),
      ...Array.from({ length: 10 }, (_, i) => ({ stars: 5, reviewedAt: daysBefore(20 + i) })),
    ];
    const res = scoreCategory(
      [
        { sku: 'cluster', reviews: [...baseline, ...recent(5)] },
        { sku: 'quiet', reviews: [...baseline, ...recent(2)] },
      ],
      { clusterPhrases: ['hinge snapped', 'lid loose', 'smells'] },
      { asOf },
    );
    const [cluster, quiet] = res.items;
    // 7 one-star reviews, the window holding 15 of 75 reviews: expected 7 * 0.2 = 1.4, and
    // P(X >= 5) for Binomial(7, 0.2) = 21*0.2^5*0.8^2 + 7*0.2^6*0.8 + 0.2^7 = 0.004672 (from the definition).
    expect(cluster!.clusterExpected).toBeCloseTo(1.4, 12);
    expect(cluster!.negativeCluster).toBe(true);
    expect(cluster!.clusterPValue!).toBeCloseTo(0.004672, 14);
    expect(cluster!.recurringPhrases).toEqual([
      { phrase: 'hinge snapped', count: 5 },
      { phrase: 'lid loose', count: 2 },
    ]);
    // Two one-star reviews are below the minimum of three, whatever the p-value.
    expect(quiet!.negativeCluster).toBe(false);
    expect(res.category.negativeClusterCount).toBe(1);
  });

  it('leaves the cluster test open without a baseline or without dates', () => {
    const res = scoreCategory(
      [
        { sku: 'new', reviews: [{ stars: 1, reviewedAt: daysBefore(3) }] },
        { sku: 'counts', count: 5, mean: 2 },
      ],
      {},
      { asOf },
    );
    expect(res.items[0]).toMatchObject({
      negativeCluster: null,
      clusterReason: 'no reviews in the baseline period',
    });
    expect(res.items[1]).toMatchObject({ negativeCluster: null, clusterReason: 'review dates not known' });
  });
});

describe('what it would take and week over week', () => {
  it('asks for 6 five-star reviews where (10*4 + 35 + 5k)/(20 + k) must pass 4', () => {
    const res = scoreCategory(
      [
        { sku: 'top', count: 10, mean: 4.5 },
        { sku: 'mid', count: 30, mean: 4 },
        { sku: 'low', count: 10, mean: 3.5 },
      ],
      { priorWeightStrategy: 'fixed', priorWeightValue: 10, priorMeanStrategy: 'fixed', priorMeanValue: 4 },
      { asOf },
    );
    const low = res.items.find((it) => it.sku === 'low')!;
    expect(low).toMatchObject({ aboveSku: 'mid', aboveScore: 4, whatItTakes: 'reviews', reviewsToPass: 6 });
    expect(res.items.find((it) => it.sku === 'top')!.whatItTakes).toBe('top');
    const fours = scoreCategory(
      [
        { sku: 'mid', count: 30, mean: 4 },
        { sku: 'low', count: 10, mean: 3.5 },
      ],
      {
        priorWeightStrategy: 'fixed',
        priorWeightValue: 10,
        priorMeanStrategy: 'fixed',
        priorMeanValue: 4,
        whatItTakesStars: 4,
      },
      { asOf },
    );
    expect(fours.items[1]).toMatchObject({ whatItTakes: 'impossible', reviewsToPass: null });
  });

  it('reports movement against the previous ranking and lists movers beyond the threshold', () => {
    const items = Array.from({ length: 8 }, (_, i) => ({ sku: `m${i}`, count: 50, mean: 5 - i * 0.4 }));
    const previous = items.map((it, i) => ({ sku: it.sku, naiveRank: 8 - i, smoothedRank: 8 - i }));
    const res = scoreCategory(items, { moverThreshold: 5 }, { asOf, previous });
    expect(res.items[0]).toMatchObject({ naiveMovement: 7, smoothedMovement: 7 });
    expect(res.category.previousMatched).toBe(8);
    expect(res.category.movers.map((m) => m.sku)).toEqual(['m0', 'm7', 'm1', 'm6']);
  });
});

describe('request and response schemas', () => {
  it('answers with field paths a 400 can show', () => {
    const parsed = scoreRequestSchema.safeParse({
      items: [
        { sku: 'a', count: 3, mean: 4 },
        { sku: 'b', count: 3, mean: 4 },
        { sku: 'c', histogram: [1, 2, 3, 4, 5], count: 3 },
        { sku: 'd', count: 3, mean: 5.5 },
        { sku: 'e', reviews: [{ stars: 7, reviewedAt: '2025-01-01' }] },
        { sku: 'a', count: 2.5 },
      ],
    });
    expect(parsed.success).toBe(false);
    const lines = describeIssues(parsed.error!);
    expect(lines).toContain('items.3.mean: must be between 1 and 5');
    expect(lines).toContain('items.4.reviews.0.stars: must be a whole number from 1 to 5');
    expect(lines).toContain('items.2.histogram: counts add up to 15, not the count 3');
    expect(lines).toContain('items.5.count: must be a whole number');
    const dup = scoreRequestSchema.safeParse({
      items: [
        { sku: 'a', count: 0 },
        { sku: 'a', count: 1, mean: 2 },
      ],
    });
    expect(describeIssues(dup.error!)).toEqual(['items.1.sku: repeats the sku of items.0']);
  });

  it('scores the sample request and the result matches the response schema', () => {
    const body: unknown = JSON.parse(readFileSync('templates/score/score-request.sample.json', 'utf8'));
    const request = scoreRequestSchema.parse(body);
    const result = scoreRequest(request, new Date('2030-01-01'));
    expect(result.resolved.asOf).toBe('2025-03-03T00:00:00.000Z');
    expect(scoreResponseSchema.safeParse(result).success).toBe(true);
    expect(result.items.find((it) => it.sku === 'FN-203')!.negativeCluster).toBe(true);
  });
});
