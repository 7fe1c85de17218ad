import fc from 'fast-check';
import { gammaln } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  binEdges,
  binOf,
  meanDrawer,
  posteriorPlan,
  scoreWithRankIntervals,
  smoothedListing,
} from '../../../shared/scoring/rank-intervals';
import { posteriorVariance, scoreCategory } from '../../../shared/scoring/score-category';
import { toColumns } from '../../../shared/scoring/summary';
import type { CountMeanInput, HistogramInput, ItemInput, StarHistogram } from '../../../shared/scoring/types';

// Invented data throughout. Sources: Goldstein & Spiegelhalter 1996, JRSS A 159 (rank intervals from
// posterior draws); Marshall & Spiegelhalter 1998, BMJ 316; Marsaglia & Tsang 2000, ACM TOMS 26(3).
const asOf = '2026-11-30T00:00:00Z';

function hist(sku: string, h: StarHistogram): HistogramInput {
  return { sku, histogram: h };
}

/** Monte Carlo standard error of a share p estimated from S independent draws (binomial). */
function mcError(p: number, S: number): number {
  return Math.sqrt(Math.max(p * (1 - p), 1e-4) / S);
}

/**
 * P(X > Y) for X ~ Beta(a1, b1), Y ~ Beta(a2, b2) with whole a1: the closed form of Evan Miller (2015,
 * "Formulas for Bayesian A/B testing"), sum_{i<a1} B(a2 + i, b1 + b2) / ((b1 + i) B(1 + i, b1) B(a2, b2)).
 */
function betaAheadExact(a1: number, b1: number, a2: number, b2: number): number {
  const lnB = (a: number, b: number) => gammaln(a) + gammaln(b) - gammaln(a + b);
  let p = 0;
  for (let i = 0; i < a1; i++)
    p += Math.exp(lnB(a2 + i, b1 + b2) - Math.log(b1 + i) - lnB(1 + i, b1) - lnB(a2, b2));
  return p;
}

/** P(X > Y) for two Betas by the midpoint rule on a fine grid: sum f_X(x) F_Y(x) dx. */
function betaAheadNumeric(a1: number, b1: number, a2: number, b2: number, steps = 20_000): number {
  const lnB = (a: number, b: number) => gammaln(a) + gammaln(b) - gammaln(a + b);
  const h = 1 / steps;
  let cdfY = 0;
  let p = 0;
  for (let j = 0; j < steps; j++) {
    const x = (j + 0.5) * h;
    const fy = Math.exp((a2 - 1) * Math.log(x) + (b2 - 1) * Math.log(1 - x) - lnB(a2, b2));
    const fx = Math.exp((a1 - 1) * Math.log(x) + (b1 - 1) * Math.log(1 - x) - lnB(a1, b1));
    cdfY += fy * h * 0.5;
    p += fx * cdfY * h;
    cdfY += fy * h * 0.5;
  }
  return p;
}

describe('rank intervals: P(the item above is truly ahead)', () => {
  it('matches the exact Beta answer for two two-level items without a prior (Miller 2015)', () => {
    // m = 0 and only 1- and 5-star reviews: each mean star is 1 + 4*Beta(n5, n1) exactly.
    const items = [hist('A', [4, 0, 0, 0, 16]), hist('B', [6, 0, 0, 0, 14])];
    const settings = { priorWeightStrategy: 'fixed' as const, priorWeightValue: 0 };
    const S = 20_000;
    const { result, intervals } = scoreWithRankIntervals(items, settings, { asOf }, { draws: S, seed: 7 });
    const b = result.items.findIndex((it) => it.sku === 'B');
    expect(result.items[b]!.smoothedPosition).toBe(2);
    const exact = betaAheadExact(16, 4, 14, 6);
    const sampled = intervals.aboveAheadShare[b]!;
    // Within 4 Monte Carlo standard errors sqrt(p(1 - p)/S) (about 0.0033 here).
    expect(Math.abs(sampled - exact)).toBeLessThan(4 * mcError(exact, S));
    expect(exact).toBeGreaterThan(0.6);
  });

  it('matches numerical integration of two Beta posteriors with a fractional prior', () => {
    // Category shares only at 1 and 5 stars, so a_k = m*p_k + n_k keeps every item two-level.
    const items = [hist('A', [3, 0, 0, 0, 9]), hist('B', [10, 0, 0, 0, 25]), hist('C', [1, 0, 0, 0, 1])];
    const res = scoreCategory(items, {}, { asOf });
    const { m, starShares } = res.resolved;
    expect(m).toBeCloseTo(49 / 3, 12);
    const S = 20_000;
    const { result, intervals } = scoreWithRankIntervals(items, {}, { asOf }, { draws: S, seed: 11 });
    const listing = smoothedListing(result);
    const upper = listing[0]!;
    const lower = listing[1]!;
    const a = (i: number) => m * starShares![4] + items[i]!.histogram[4];
    const bb = (i: number) => m * starShares![0] + items[i]!.histogram[0];
    const numeric = betaAheadNumeric(a(upper), bb(upper), a(lower), bb(lower));
    expect(Math.abs(intervals.aboveAheadShare[lower]! - numeric)).toBeLessThan(4 * mcError(numeric, S));
  });
});

describe('rank intervals: shape of the answer', () => {
  it('gives an item with overwhelming evidence at the top the interval [1, 1]', () => {
    const items: ItemInput[] = [hist('sure', [0, 0, 0, 100, 100_000])];
    for (let i = 0; i < 12; i++) items.push(hist(`o${i}`, [2, 3, 5, 8, 6 + i]));
    const { result, intervals } = scoreWithRankIntervals(items, {}, { asOf }, { draws: 2000, seed: 3 });
    expect(result.items[0]!.smoothedRank).toBe(1);
    expect([intervals.lowerRank[0], intervals.medianRank[0], intervals.upperRank[0]]).toEqual([1, 1, 1]);
    expect(intervals.topShare[0]).toBe(1);
    expect(intervals.aboveAheadShare[0]).toBeNaN();
  });

  it('gives identical items the same symmetric interval', () => {
    const same: StarHistogram = [1, 1, 2, 4, 4];
    const items = [hist('x', same), hist('y', same), hist('z', same)];
    const { intervals } = scoreWithRankIntervals(items, {}, { asOf }, { draws: 6000, seed: 5 });
    // Three exchangeable items: each rank 1, 2, 3 with probability 1/3.
    for (let i = 0; i < 3; i++) {
      expect([intervals.lowerRank[i], intervals.medianRank[i], intervals.upperRank[i]]).toEqual([1, 2, 3]);
    }
    const top1 = scoreWithRankIntervals(items, {}, { asOf }, { draws: 6000, seed: 5, topK: 1 }).intervals;
    for (let i = 0; i < 3; i++)
      expect(Math.abs(top1.topShare[i]! - 1 / 3)).toBeLessThan(4 * mcError(1 / 3, 6000));
    const pair = scoreWithRankIntervals(
      [hist('p', same), hist('q', same)],
      {},
      { asOf },
      { draws: 8000, seed: 9 },
    );
    const second = pair.result.items.findIndex((it) => it.smoothedPosition === 2);
    expect(Math.abs(pair.intervals.aboveAheadShare[second]! - 0.5)).toBeLessThan(4 * mcError(0.5, 8000));
  });

  it('reproduces every figure from the same seed and S, and changes with the seed', () => {
    const items = Array.from({ length: 25 }, (_, i) =>
      hist(`s${i}`, [i % 3, 1, 2, 3 + (i % 4), 2 + (i % 5)]),
    );
    const one = scoreWithRankIntervals(items, {}, { asOf }, { draws: 500, seed: 42 }).intervals;
    const two = scoreWithRankIntervals(items, {}, { asOf }, { draws: 500, seed: 42 }).intervals;
    const other = scoreWithRankIntervals(items, {}, { asOf }, { draws: 500, seed: 43 }).intervals;
    expect(two.lowerRank).toEqual(one.lowerRank);
    expect(two.upperRank).toEqual(one.upperRank);
    expect(two.aboveAheadShare).toEqual(one.aboveAheadShare);
    expect(other.aboveAheadShare).not.toEqual(one.aboveAheadShare);
  });

  it('keeps the point rank inside its interval and the interval ordered', () => {
    const items = Array.from({ length: 40 }, (_, i) => hist(`k${i}`, [i % 4, 2, i % 3, 4, (i * 7) % 11]));
    const { result, intervals } = scoreWithRankIntervals(items, {}, { asOf }, { draws: 1000, seed: 1 });
    result.items.forEach((it, i) => {
      expect(intervals.lowerRank[i]).toBeLessThanOrEqual(intervals.medianRank[i]!);
      expect(intervals.medianRank[i]).toBeLessThanOrEqual(intervals.upperRank[i]!);
      expect(it.smoothedRank).toBeGreaterThanOrEqual(intervals.lowerRank[i]!);
      expect(it.smoothedRank).toBeLessThanOrEqual(intervals.upperRank[i]!);
    });
  });
});

describe('rank intervals: posterior draws', () => {
  function moments(items: ItemInput[], S: number) {
    const res = scoreCategory(items, {}, { asOf });
    const plan = posteriorPlan(toColumns(items, asOf, res.resolved), res.resolved);
    const draw = meanDrawer(plan, 99);
    const out = new Float64Array(items.length);
    const sum = new Float64Array(items.length);
    const sq = new Float64Array(items.length);
    for (let s = 0; s < S; s++) {
      draw(out);
      for (let i = 0; i < items.length; i++) {
        sum[i]! += out[i]!;
        sq[i]! += out[i]! * out[i]!;
      }
    }
    return {
      res,
      plan,
      mean: [...sum].map((x) => x / S),
      variance: [...sum].map((x, i) => sq[i]! / S - (x / S) ** 2),
    };
  }

  it('draws Dirichlet means with the posterior mean and variance of DESIGN 4.3', () => {
    // Dirichlet(a): E = sum k a_k / a0, Var = (sum k^2 a_k / a0 - E^2) / (a0 + 1) (standard moments).
    const items = [hist('a', [1, 0, 2, 5, 12]), hist('b', [4, 4, 4, 4, 4]), hist('c', [0, 0, 0, 1, 0])];
    const S = 40_000;
    const { res, plan, mean, variance } = moments(items, S);
    const { m, starShares } = res.resolved;
    items.forEach((it, i) => {
      expect(plan.kind[i]).toBe(0);
      const a = it.histogram.map((c, k) => m * starShares![k]! + c);
      const a0 = a.reduce((x, y) => x + y, 0);
      const e = a.reduce((x, ak, k) => x + (k + 1) * ak, 0) / a0;
      const v = (a.reduce((x, ak, k) => x + (k + 1) ** 2 * ak, 0) / a0 - e * e) / (a0 + 1);
      expect(e).toBeCloseTo(res.items[i]!.smoothed, 12);
      expect(Math.abs(mean[i]! - e)).toBeLessThan(5 * Math.sqrt(v / S));
      expect(Math.abs(variance[i]! / v - 1)).toBeLessThan(0.05);
    });
  });

  it('draws mean-and-count items from a Beta on [1, 5] with the lower bound moments', () => {
    const items: CountMeanInput[] = [
      { sku: 'u', count: 12, mean: 4.5 },
      { sku: 'v', count: 300, mean: 3.9 },
      { sku: 'w', count: 0, mean: null },
    ];
    const S = 40_000;
    const { res, plan, mean, variance } = moments(items, S);
    const { m, C, priorVariance } = res.resolved;
    items.forEach((it, i) => {
      expect(plan.kind[i]).toBe(1);
      const r = it.count > 0 ? it.mean! : Number.NaN;
      const v = posteriorVariance(
        m,
        C,
        priorVariance,
        it.count,
        r,
        it.count > 0 ? (r - 1) * (5 - r) : 0,
        res.items[i]!.smoothed,
      );
      expect(Math.abs(mean[i]! - res.items[i]!.smoothed)).toBeLessThan(5 * Math.sqrt(v / S));
      expect(Math.abs(variance[i]! / v - 1)).toBeLessThan(0.05);
    });
  });

  it('bins ranks exactly up to 2H and never wider than 1/H beyond', () => {
    const H = 64;
    let last = -1;
    const wrong: number[] = [];
    for (let rank = 1; rank <= 50_000; rank++) {
      const b = binOf(rank, H, 6);
      const [first, end] = binEdges(b, H);
      const ok =
        rank >= first &&
        rank <= end &&
        (rank > 2 * H || first === end) &&
        end - first + 1 <= Math.max(1, rank / H) &&
        (b === last || b === last + 1);
      if (!ok) wrong.push(rank);
      last = b;
    }
    expect(wrong).toEqual([]);
  });
});

describe('rank intervals: more evidence, narrower intervals (property)', () => {
  it('shrinks the summed interval width when every histogram grows tenfold', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(...Array.from({ length: 5 }, () => fc.integer({ min: 0, max: 6 }))), {
          minLength: 4,
          maxLength: 8,
        }),
        (rows) => {
          const few = rows.map((h, i) => hist(`f${i}`, [h[0]! + 1, h[1]!, h[2]!, h[3]!, h[4]! + i]));
          const many = few.map((it) =>
            hist(it.sku, it.histogram.map((c) => c * 10) as unknown as StarHistogram),
          );
          const width = (items: HistogramInput[]) => {
            const { intervals } = scoreWithRankIntervals(items, {}, { asOf }, { draws: 400, seed: 17 });
            let w = 0;
            for (let i = 0; i < items.length; i++) w += intervals.upperRank[i]! - intervals.lowerRank[i]!;
            return w;
          };
          expect(width(many)).toBeLessThanOrEqual(width(few));
        },
      ),
      { numRuns: 25, seed: 20261203 },
    );
  });
});
