import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { kendallTauB, spearmanRho } from '../../../shared/scoring/rank-stats';
import { scoreCategory } from '../../../shared/scoring/score-category';
import { priorWeightStrategies } from '../../../shared/scoring/settings';
import { smoothedScore } from '../../../shared/scoring/smoothing';
import type { CountMeanInput, HistogramInput } from '../../../shared/scoring/types';

// Invented data throughout: these check properties from DESIGN §4, never expected values.
const asOf = '2025-01-01';

const countMeanItems = fc
  .array(
    fc.record({
      count: fc.integer({ min: 0, max: 5000 }),
      mean: fc.double({ min: 1, max: 5, noNaN: true }),
    }),
    { minLength: 1, maxLength: 40 },
  )
  .map((rows) =>
    rows.map((r, i): CountMeanInput => ({
      sku: `I${i}`,
      count: r.count,
      mean: r.count === 0 ? null : r.mean,
    })),
  );

const histogramItems = fc
  .array(fc.tuple(...Array.from({ length: 5 }, () => fc.integer({ min: 0, max: 60 }))), {
    minLength: 2,
    maxLength: 30,
  })
  .map((rows) =>
    rows.map((h, i): HistogramInput => ({ sku: `H${i}`, histogram: [h[0]!, h[1]!, h[2]!, h[3]!, h[4]!] })),
  );

const strategy = fc.constantFrom(...priorWeightStrategies.filter((s) => s !== 'fixed'));

describe('Bayesian average (DESIGN §4.2)', () => {
  it('lies between the raw mean and C for every item and every strategy', () => {
    fc.assert(
      fc.property(countMeanItems, strategy, (items, priorWeightStrategy) => {
        const { items: out, resolved } = scoreCategory(items, { priorWeightStrategy }, { asOf });
        for (const it of out) {
          if (it.rawMean === null) {
            expect(it.smoothed).toBeCloseTo(resolved.C, 12);
            continue;
          }
          const lo = Math.min(it.rawMean, resolved.C) - 1e-12;
          const hi = Math.max(it.rawMean, resolved.C) + 1e-12;
          expect(it.smoothed).toBeGreaterThanOrEqual(lo);
          expect(it.smoothed).toBeLessThanOrEqual(hi);
        }
      }),
    );
  });

  it('tends to the raw mean as the count grows', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 1000, noNaN: true }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        (m, C, r) => {
          let previousGap = Number.POSITIVE_INFINITY;
          for (const n of [1, 10, 100, 1e4, 1e6, 1e9]) {
            const gap = Math.abs(smoothedScore(m, C, n, n * r) - r);
            expect(gap).toBeLessThanOrEqual(previousGap + 1e-15);
            previousGap = gap;
          }
          expect(previousGap).toBeLessThan(1e-5);
        },
      ),
    );
  });

  it('pulls items below C with fewer reviews up more', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.5, max: 500, noNaN: true }),
        fc.double({ min: 1, max: 4.9, noNaN: true }),
        fc.integer({ min: 1, max: 1000 }),
        fc.integer({ min: 1, max: 1000 }),
        (m, r, a, b) => {
          fc.pre(a !== b);
          const C = Math.min(5, r + 0.1 + (5 - r) / 2);
          const [few, many] = a < b ? [a, b] : [b, a];
          const liftFew = smoothedScore(m, C, few, few * r) - r;
          const liftMany = smoothedScore(m, C, many, many * r) - r;
          expect(liftFew).toBeGreaterThan(liftMany);
          expect(liftMany).toBeGreaterThan(0);
        },
      ),
    );
  });

  it('never falls after one more 5-star review, holding m and C', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1000, noNaN: true }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        fc.integer({ min: 0, max: 10000 }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        (m, C, n, r) => {
          const before = smoothedScore(m, C, n, n * r);
          const after = smoothedScore(m, C, n + 1, n * r + 5);
          expect(after).toBeGreaterThanOrEqual(before - 1e-12);
        },
      ),
    );
  });
});

describe('star-histogram model (DESIGN §4.3)', () => {
  it('has the Dirichlet-multinomial posterior mean and sd with a_k = m p_k', () => {
    fc.assert(
      fc.property(histogramItems, fc.double({ min: 0.1, max: 200, noNaN: true }), (items, m) => {
        const res = scoreCategory(items, { priorWeightStrategy: 'fixed', priorWeightValue: m }, { asOf });
        const p = res.resolved.starShares!;
        for (const [i, it] of res.items.entries()) {
          const h = items[i]!.histogram;
          const alpha = h.map((c, k) => m * p[k]! + c);
          const a0 = alpha.reduce((x, y) => x + y, 0);
          const mean = alpha.reduce((x, a, k) => x + (k + 1) * a, 0) / a0;
          const second = alpha.reduce((x, a, k) => x + (k + 1) ** 2 * a, 0) / a0;
          const sd = Math.sqrt((second - mean * mean) / (a0 + 1));
          expect(it.smoothed).toBeCloseTo(mean, 10);
          expect(it.lowerBound).toBeCloseTo(mean - 1.65 * sd, 10);
          expect(it.lowerBoundBasis).toBe('histogram');
        }
      }),
    );
  });

  it('keeps the lower bound at or below the smoothed score, equal with z = 0', () => {
    fc.assert(
      fc.property(countMeanItems, fc.double({ min: 0, max: 4, noNaN: true }), (items, z) => {
        const res = scoreCategory(items, { z }, { asOf });
        for (const it of res.items) expect(it.lowerBound).toBeLessThanOrEqual(it.smoothed + 1e-12);
        const flat = scoreCategory(items, { z: 0 }, { asOf });
        for (const it of flat.items) expect(it.lowerBound).toBeCloseTo(it.smoothed, 12);
      }),
    );
  });
});

describe('rankings (DESIGN §4.6)', () => {
  it('gives positions 1..N once each and standard competition ranks along them', () => {
    fc.assert(
      fc.property(countMeanItems, (items) => {
        const res = scoreCategory(items, {}, { asOf });
        for (const [posKey, rankKey, scoreKey] of [
          ['naivePosition', 'naiveRank', 'rawMean'],
          ['smoothedPosition', 'smoothedRank', 'smoothed'],
        ] as const) {
          const byPos = [...res.items].sort((a, b) => a[posKey] - b[posKey]);
          expect(byPos.map((x) => x[posKey])).toEqual(byPos.map((_, i) => i + 1));
          byPos.forEach((it, p) => {
            const prev = byPos[p - 1];
            // Documented rule: scores within 1e-12 relative of each other are one tie.
            const a = prev?.[scoreKey] ?? -1;
            const b = it[scoreKey] ?? -1;
            const tied = prev !== undefined && Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));
            expect(it[rankKey]).toBe(tied ? prev[rankKey] : p + 1);
            if (prev && !tied) expect(prev[scoreKey] ?? -1).toBeGreaterThan(it[scoreKey] ?? -1);
          });
          for (const it of res.items) {
            const sameRank = res.items.filter((x) => x[rankKey] === it[rankKey]).length;
            const next = res.items.filter((x) => x[rankKey] > it[rankKey]).map((x) => x[rankKey]);
            if (next.length > 0) expect(Math.min(...next)).toBe(it[rankKey] + sameRank);
          }
        }
        for (const it of res.items) expect(it.drift).toBe(it.naiveRank - it.smoothedRank);
      }),
    );
  });

  it('breaks ties by count descending, then sku ascending', () => {
    const res = scoreCategory(
      [
        { sku: 'b', count: 4, mean: 5 },
        { sku: 'a', count: 4, mean: 5 },
        { sku: 'c', count: 9, mean: 5 },
      ],
      {},
      { asOf },
    );
    const naive = [...res.items].sort((x, y) => x.naivePosition - y.naivePosition).map((x) => x.sku);
    expect(naive).toEqual(['c', 'a', 'b']);
    expect(res.items.map((x) => x.naiveRank)).toEqual([1, 1, 1]);
  });

  it('keeps rho and tau-b in [-1, 1] and at 1 for identical orderings', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 9 }), fc.integer({ min: 0, max: 9 })), {
          minLength: 2,
          maxLength: 50,
        }),
        (pairs) => {
          const x = pairs.map((p) => p[0]);
          const y = pairs.map((p) => p[1]);
          for (const v of [spearmanRho(x, y), kendallTauB(x, y)]) {
            if (v !== null) {
              expect(v).toBeGreaterThanOrEqual(-1);
              expect(v).toBeLessThanOrEqual(1);
            }
          }
          fc.pre(new Set(x).size > 1);
          expect(spearmanRho(x, x)).toBeCloseTo(1, 12);
          expect(kendallTauB(x, x)).toBeCloseTo(1, 12);
        },
      ),
    );
  });
});
