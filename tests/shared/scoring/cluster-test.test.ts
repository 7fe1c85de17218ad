import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { scoreCategory } from '../../../shared/scoring/score-category';
import { binomialUpperTail, conditionalRateTest } from '../../../shared/scoring/stats';
import type { ItemSummary, ReviewInput } from '../../../shared/scoring/types';

const asOf = '2026-11-30T00:00:00Z';
const daysBefore = (d: number) => new Date(Date.parse(asOf) - d * 86_400_000).toISOString();

/** P(X >= x) for X ~ Binomial(size, a / (a + b)) as an exact fraction: sum C(size, j) a^j b^(size-j) / (a + b)^size. */
function exactUpperTail(x: number, size: number, a: number, b: number): number {
  const A = BigInt(a);
  const B = BigInt(b);
  let num = 0n;
  let choose = 1n;
  for (let j = 0; j <= size; j++) {
    if (j > 0) choose = (choose * BigInt(size - j + 1)) / BigInt(j);
    if (j >= x) num += choose * A ** BigInt(j) * B ** BigInt(size - j);
  }
  if (num === 0n) return 0;
  const den = (A + B) ** BigInt(size);
  // 64 significant bits of the fraction, then a double.
  const shift = den.toString(2).length - num.toString(2).length + 64;
  return Number((num << BigInt(shift)) / den) * 2 ** -(shift >> 1) * 2 ** -(shift - (shift >> 1));
}

/** mulberry32, a small deterministic PRNG; fixed seeds make the simulation repeatable. */
function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Binomial(size, p) draw by inversion of the CDF, walking the pmf upwards from 0. */
function drawBinomial(rand: () => number, size: number, p: number): number {
  const u = rand();
  const odds = p / (1 - p);
  let term = (1 - p) ** size;
  let cdf = term;
  let j = 0;
  while (u > cdf && j < size) {
    term *= ((size - j) / (j + 1)) * odds;
    j++;
    cdf += term;
  }
  return j;
}

function summary(sku: string, xw: number, nw: number, xb: number, nb: number): ItemSummary {
  const n = nw + nb;
  const ones = xw + xb;
  return {
    sku,
    n,
    sumStars: ones + 4 * (n - ones),
    histogram: null,
    newestAt: null,
    medianAgeDays: null,
    recentCount: null,
    decayWeightSum: null,
    decayWeightedStarSum: null,
    decayWeightSqSum: null,
    helpfulWeightSum: null,
    helpfulWeightedStarSum: null,
    mostHelpfulStars: null,
    mostHelpfulAt: null,
    reviewerWeightSum: null,
    reviewerWeightedStarSum: null,
    oneStarRecent: xw,
    totalRecent: nw,
    oneStarBaseline: xb,
    totalBaseline: nb,
    phraseCounts: null,
  };
}

describe('binomial upper tail', () => {
  it('matches the exact fraction from the definition of the binomial distribution', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 80 }),
        fc.integer({ min: 1, max: 400 }),
        fc.integer({ min: 1, max: 400 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (size, a, b, at) => {
          const x = Math.round(at * size);
          const exact = exactUpperTail(x, size, a, b);
          const got = binomialUpperTail(x, size, a / (a + b));
          expect(Math.abs(got - exact)).toBeLessThanOrEqual(1e-13 * Math.max(exact, 1e-30) + 1e-300);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('agrees with @stdlib/stats-base-dists-binomial-cdf on larger counts', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 200_000 }),
        fc.double({ min: 0.001, max: 0.999, noNaN: true }),
        fc.double({ min: -6, max: 6, noNaN: true }),
        (size, p, zs) => {
          const sd = Math.sqrt(size * p * (1 - p));
          const x = Math.min(size, Math.max(1, Math.round(size * p + zs * sd)));
          const reference = 1 - binomialCdf(x - 1, size, p);
          const got = binomialUpperTail(x, size, p);
          // 1 - CDF carries an absolute error near 1e-16, so only tails well above it are compared relatively.
          expect(Math.abs(got - reference)).toBeLessThanOrEqual(1e-12 + 1e-9 * reference);
        },
      ),
      { numRuns: 300 },
    );
  });

  it('gives P(X >= 6) = 8/128 for Binomial(7, 1/2), the issue’s worked example', () => {
    // 1 one-star among 30 baseline reviews and 6 among 30 recent: 7 one-star reviews, each in the window
    // with probability 30/60. (C(7,6) + C(7,7)) / 2^7 = 0.0625, from the definition.
    const { pValue, expected } = conditionalRateTest(6, 30, 1, 30);
    expect(pValue).toBeCloseTo(0.0625, 14);
    expect(expected).toBe(3.5);
  });
});

describe('negative-cluster test (Przyborowski & Wilenski 1940)', () => {
  it('does not flag 6 one-star reviews in 30 against 1 in 30 before (the old Poisson plug-in gave p = 0.004)', () => {
    const reviews: ReviewInput[] = [
      ...Array.from({ length: 30 }, (_, i) => ({
        stars: i === 0 ? 1 : 5,
        reviewedAt: daysBefore(120 + i * 7),
      })),
      ...Array.from({ length: 30 }, (_, i) => ({ stars: i < 6 ? 1 : 5, reviewedAt: daysBefore(3 + i * 2) })),
    ];
    const res = scoreCategory([{ sku: 'desk-fan', reviews }], {}, { asOf });
    const item = res.items[0]!;
    expect(item.clusterObserved).toBe(6);
    expect(item.clusterExpected).toBe(3.5);
    expect(item.clusterPValue).toBeCloseTo(0.0625, 14);
    expect(item.negativeCluster).toBe(false);
    expect(res.resolved.clusterBaselineDays).toBe(365);
  });

  it('leaves reviews older than the baseline window out of the test', () => {
    const reviews: ReviewInput[] = [
      ...Array.from({ length: 40 }, (_, i) => ({ stars: 5, reviewedAt: daysBefore(100 + i * 5) })),
      // One-star reviews long before the baseline would dilute the window if they counted.
      ...Array.from({ length: 40 }, () => ({ stars: 1, reviewedAt: daysBefore(700) })),
      ...Array.from({ length: 10 }, (_, i) => ({ stars: i < 5 ? 1 : 5, reviewedAt: daysBefore(5 + i) })),
    ];
    const item = scoreCategory([{ sku: 'kettle', reviews }], {}, { asOf }).items[0]!;
    // 5 one-star reviews, all in the window, whose share of reviews is 10/50: p = 0.2^5.
    expect(item.clusterPValue).toBeCloseTo(0.2 ** 5, 14);
    expect(item.negativeCluster).toBe(true);
  });

  /*
   * Calibration by simulation. Under no change both periods share one one-star rate. 25 designs
   * (5 rates x 5 window/baseline sizes), 8 000 items each, 200 000 in all, drawn with mulberry32 from
   * fixed seeds. Monte Carlo standard error of a rate near 0.01: sqrt(0.01 * 0.99 / 200 000) = 0.00022
   * overall and 0.0011 per design. The test is exact and discrete, so its size is at most the nominal
   * 0.01; the assertions allow 3 standard errors of simulation noise.
   */
  it('flags at most the nominal 1 % of items whose one-star rate has not changed', () => {
    const rates = [0.02, 0.05, 0.1, 0.2, 0.3];
    const designs: [number, number][] = [
      [30, 30],
      [15, 60],
      [25, 100],
      [100, 400],
      [250, 1000],
    ];
    const perDesign = 8000;
    let flagged = 0;
    let items = 0;
    let seed = 1;
    for (const rate of rates) {
      for (const [nw, nb] of designs) {
        const rand = prng(seed++);
        const batch = Array.from({ length: perDesign }, (_, i) =>
          summary(`s${i}`, drawBinomial(rand, nw, rate), nw, drawBinomial(rand, nb, rate), nb),
        );
        const res = scoreCategory(batch, {}, { asOf });
        const count = res.category.negativeClusterCount;
        const se = Math.sqrt((0.01 * 0.99) / perDesign);
        expect(count / perDesign, `rate ${rate}, window ${nw}, baseline ${nb}`).toBeLessThanOrEqual(
          0.01 + 3 * se,
        );
        flagged += count;
        items += perDesign;
      }
    }
    const overall = flagged / items;
    expect(overall).toBeLessThanOrEqual(0.01 + 3 * Math.sqrt((0.01 * 0.99) / items));
  });

  /*
   * Power: a planted cluster where the one-star rate rises from 5 % to 20 % in the window (100 reviews
   * in the window, 400 in the baseline); 4 000 items, MC standard error of the power at most 0.008
   * (0.0034 near the 0.95 this seed gives).
   */
  it('flags almost every item with a planted fourfold rise in one-star reviews', () => {
    const rand = prng(2026);
    const n = 4000;
    const batch = Array.from({ length: n }, (_, i) =>
      summary(`p${i}`, drawBinomial(rand, 100, 0.2), 100, drawBinomial(rand, 400, 0.05), 400),
    );
    const power = scoreCategory(batch, {}, { asOf }).category.negativeClusterCount / n;
    expect(power).toBeGreaterThanOrEqual(0.9);
  });
});
