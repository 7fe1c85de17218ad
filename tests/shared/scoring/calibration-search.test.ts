import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { calibrate, searchPriorWeight } from '../../../shared/scoring/calibration';
import type { CalibrationResult } from '../../../shared/scoring/calibration';
import type { HistogramInput } from '../../../shared/scoring/types';
import { calibrateAllPairs } from './calibration-all-pairs';

const asOf = '2025-01-01';

/**
 * Invented categories drawn from a small pool of histograms, so that identical items (always tied),
 * equal means at different counts (swap at m = 0) and equal counts at different means all occur.
 */
const histogram = fc.tuple(...Array.from({ length: 5 }, () => fc.integer({ min: 0, max: 12 })));
const category = (min: number, max: number) =>
  fc
    .tuple(
      fc.array(histogram, { minLength: 1, maxLength: 24 }),
      fc.array(fc.tuple(fc.nat(), fc.integer({ min: 1, max: 3 })), {
        minLength: min,
        maxLength: max,
        size: 'medium',
      }),
    )
    .map(([pool, picks]) =>
      picks.map(([p, scale], i): HistogramInput => {
        const h = pool[p % pool.length]!;
        return { sku: `S${i}`, histogram: h.map((x) => x * scale) as unknown as HistogramInput['histogram'] };
      }),
    );

/** A permutation of the skus from a seed (Fisher–Yates with an LCG), or the order at some m, reversed in part. */
function observedFrom(items: HistogramInput[], seed: number): string[] {
  const observed = items.map((x) => x.sku);
  let state = seed;
  const next = () => (state = (state * 1103515245 + 12345) % 2147483648);
  for (let i = observed.length - 1; i > 0; i--) {
    const j = next() % (i + 1);
    [observed[i], observed[j]] = [observed[j]!, observed[i]!];
  }
  return observed;
}

function observedNear(items: HistogramInput[], seed: number): string[] {
  // The order smoothed with C = 3 at m = 0.5 + seed % 50 (close to the fitted one), a few neighbours swapped.
  const m = 0.5 + (seed % 50);
  const total = (h: readonly number[]) => h.reduce((a, b) => a + b, 0);
  const stars = (h: readonly number[]) => h.reduce((a, b, k) => a + b * (k + 1), 0);
  const C = 3;
  const order = items
    .map((it) => ({ sku: it.sku, s: (m * C + stars(it.histogram)) / (m + total(it.histogram)) }))
    .sort((a, b) => b.s - a.s || (a.sku < b.sku ? -1 : 1))
    .map((x) => x.sku);
  let state = seed;
  for (let t = 0; t < 3 && order.length > 1; t++) {
    state = (state * 1103515245 + 12345) % 2147483648;
    const i = state % (order.length - 1);
    [order[i], order[i + 1]] = [order[i + 1]!, order[i]!];
  }
  return order;
}

/** Everything but the drawing of the curve and the swap-point count, which are exact only when complete. */
const fitOf = (r: CalibrationResult) => ({
  C: r.C,
  matchedCount: r.matchedCount,
  unmatched: r.unmatched,
  best: r.best,
  strategies: r.strategies,
  unexplained: r.unexplained,
});

describe('swap-point search against the all-pairs sweep (test oracle)', () => {
  it('gives the all-pairs result exactly when it lists every swap point', () => {
    fc.assert(
      fc.property(category(2, 30), fc.integer({ min: 0, max: 1e9 }), fc.boolean(), (items, seed, near) => {
        const observed = near ? observedNear(items, seed) : observedFrom(items, seed);
        const options = { asOf, unexplainedCount: 50, maxCurvePoints: 2 + (seed % 40) };
        expect(calibrate(items, observed, {}, options)).toEqual(
          calibrateAllPairs(items, observed, {}, options),
        );
      }),
      { numRuns: 400 },
    );
  }, 120_000);

  it('finds the same best interval, ties, strategies and misfits with the bracket search forced', () => {
    let partial = 0;
    fc.assert(
      fc.property(
        category(2, 40),
        fc.integer({ min: 0, max: 1e9 }),
        fc.boolean(),
        fc.integer({ min: 1, max: 6 }),
        (items, seed, near, bracketPairLimit) => {
          const observed = near ? observedNear(items, seed) : observedFrom(items, seed);
          const oracle = calibrateAllPairs(items, observed, {}, { asOf, unexplainedCount: 50 });
          const fast = calibrate(
            items,
            observed,
            {},
            {
              asOf,
              unexplainedCount: 50,
              search: { exactPairLimit: 0, bracketPairLimit },
            },
          );
          expect(fitOf(fast)).toEqual(fitOf(oracle));
          if (fast.curveExact) expect(fast).toEqual(oracle);
          else {
            partial++;
            // Unlisted brackets count each crossing pair: never fewer than the distinct swap points.
            expect(fast.swapPointCount).toBeGreaterThanOrEqual(oracle.swapPointCount);
          }
        },
      ),
      { numRuns: 400 },
    );
    // The forced search must really have left brackets unlisted in many draws.
    expect(partial).toBeGreaterThan(60);
  }, 300_000);

  it('reports progress from 0 to 1, never going back', () => {
    let seed = 99;
    const rand = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
    const N = 3000;
    const n = new Float64Array(N);
    const S = new Float64Array(N);
    for (let k = 0; k < N; k++) {
      n[k] = 1 + Math.floor(rand() * 200);
      S[k] = n[k]! * (1 + rand() * 4);
    }
    const shares: number[] = [];
    const search = searchPriorWeight(
      { n, S, C: 3.2 },
      { exactPairLimit: 1000, bracketPairLimit: 5000, onProgress: (x) => shares.push(x) },
    );
    expect(search.complete).toBe(false);
    expect(shares[0]).toBe(0);
    expect(shares[shares.length - 1]).toBe(1);
    for (let i = 1; i < shares.length; i++) expect(shares[i]).toBeGreaterThanOrEqual(shares[i - 1]!);
    expect(shares.length).toBeGreaterThan(3);
  }, 60_000);
});
