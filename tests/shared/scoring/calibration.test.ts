import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { calibrate } from '../../../shared/scoring/calibration';
import type { CalibrationResult } from '../../../shared/scoring/calibration';
import { categoryMoments, priorMean } from '../../../shared/scoring/prior';
import { resolveSettings } from '../../../shared/scoring/settings';
import { toColumns } from '../../../shared/scoring/summary';
import type { HistogramInput } from '../../../shared/scoring/types';

const asOf = '2025-01-01';

// Invented categories; expected values come from the definitions (tau-b by pairs), not from the data.
const category = (min: number, max: number) =>
  fc
    .array(fc.tuple(...Array.from({ length: 5 }, () => fc.integer({ min: 0, max: 40 }))), {
      minLength: min,
      maxLength: max,
    })
    .map((rows) =>
      rows.map((h, i): HistogramInput => ({ sku: `S${i}`, histogram: [h[0]!, h[1]!, h[2]!, h[3]!, h[4]!] })),
    );

function columnsOf(items: HistogramInput[]) {
  const cols = toColumns(items, asOf, resolveSettings());
  const C = priorMean(categoryMoments(cols), resolveSettings(), []);
  return { cols, C };
}

function smoothedAt(items: HistogramInput[], m: number): number[] {
  const { cols, C } = columnsOf(items);
  return items.map((_, i) => (m + cols.n[i]! > 0 ? (m * C + cols.sumStars[i]!) / (m + cols.n[i]!) : C));
}

function tauBByPairs(x: number[], y: number[]): number | null {
  let s = 0;
  let tx = 0;
  let ty = 0;
  const n = x.length;
  const pairs = (n * (n - 1)) / 2;
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const dx = Math.sign(x[i]! - x[j]!);
      const dy = Math.sign(y[i]! - y[j]!);
      if (dx === 0) tx++;
      if (dy === 0) ty++;
      s += dx * dy;
    }
  }
  const d = Math.sqrt((pairs - tx) * (pairs - ty));
  return d > 0 ? s / d : null;
}

function tauOnCurve(result: CalibrationResult, m: number): number | null {
  const step = result.curve.find((c) => c.start <= m && (c.end === null || m < c.end));
  return step?.tau ?? null;
}

function observedAt(items: HistogramInput[], m: number): string[] {
  const s = smoothedAt(items, m);
  return items
    .map((it, i) => ({ sku: it.sku, s: s[i]! }))
    .sort((a, b) => b.s - a.s)
    .map((x) => x.sku);
}

describe('calibration against an observed ordering (DESIGN §4.8)', () => {
  it('returns a best interval that contains the m which generated the ordering', () => {
    fc.assert(
      fc.property(category(3, 25), fc.double({ min: 0.05, max: 2000, noNaN: true }), (items, mTrue) => {
        const smooth = smoothedAt(items, mTrue);
        // Exactly tied items would make the generated order arbitrary; skip those draws.
        fc.pre(new Set(smooth).size === smooth.length);
        const result = calibrate(items, observedAt(items, mTrue), {}, { asOf });
        expect(result.best.tau).toBeCloseTo(1, 12);
        expect(result.best.start).toBeLessThanOrEqual(mTrue);
        if (result.best.end !== null) expect(result.best.end).toBeGreaterThan(mTrue);
        expect(result.unexplained).toEqual([]);
      }),
      { numRuns: 150 },
    );
  });

  it('agrees with tau-b computed by pairs on a dense grid of m', () => {
    fc.assert(
      fc.property(category(2, 12), fc.integer({ min: 0, max: 1e9 }), (items, seed) => {
        // A random observed permutation from the seed (Fisher–Yates with an LCG).
        const observed = items.map((x) => x.sku);
        let state = seed;
        for (let i = observed.length - 1; i > 0; i--) {
          state = (state * 1103515245 + 12345) % 2147483648;
          const j = state % (i + 1);
          [observed[i], observed[j]] = [observed[j]!, observed[i]!];
        }
        const result = calibrate(items, observed, {}, { asOf });
        expect(result.curveExact).toBe(true);
        const obsScore = new Map(observed.map((sku, k) => [sku, observed.length - k]));
        const x = items.map((it) => obsScore.get(it.sku)!);
        const boundaries = result.curve.map((c) => c.start);
        let bestOnGrid = -2;
        for (let g = 0; g <= 300; g++) {
          const m = 10 ** (-3 + (7 * g) / 300);
          if (boundaries.some((b) => Math.abs(b - m) <= 1e-7 * m)) continue;
          const direct = tauBByPairs(x, smoothedAt(items, m));
          const curve = tauOnCurve(result, m);
          if (direct === null) expect(curve).toBeNull();
          else {
            expect(curve).toBeCloseTo(direct, 12);
            bestOnGrid = Math.max(bestOnGrid, direct);
          }
        }
        if (result.best.tau !== null) {
          expect(result.best.tau).toBeGreaterThanOrEqual(bestOnGrid - 1e-12);
          const atPoint = tauBByPairs(x, smoothedAt(items, result.best.point));
          expect(atPoint).toBeCloseTo(result.best.tau, 12);
        }
      }),
      { numRuns: 150 },
    );
  });

  it('places the named strategies on the curve and names the item the fit cannot explain', () => {
    const items: HistogramInput[] = [
      { sku: 'A', histogram: [0, 0, 1, 2, 9] },
      { sku: 'B', histogram: [2, 1, 3, 20, 60] },
      { sku: 'C', histogram: [0, 0, 0, 0, 3] },
      { sku: 'D', histogram: [5, 5, 10, 30, 30] },
      { sku: 'E', histogram: [1, 0, 2, 6, 8] },
      { sku: 'F', histogram: [10, 4, 4, 4, 4] },
    ];
    const fitted = observedAt(items, 20);
    // Move the worst item to the top: no m can explain that.
    const observed = ['F', ...fitted.filter((s) => s !== 'F')];
    const result = calibrate(items, observed, {}, { asOf });
    expect(result.unexplained[0]?.sku).toBe('F');
    expect(result.unexplained[0]?.observedPosition).toBe(1);
    const mean = result.strategies.find((s) => s.strategy === 'mean')!;
    expect(mean.m).toBeCloseTo(
      items.reduce((a, it) => a + it.histogram.reduce((x, y) => x + y, 0), 0) / 6,
      12,
    );
    expect(mean.tau).toBe(tauOnCurve(result, mean.m!));
    expect(result.strategies.map((s) => s.strategy)).toEqual([
      'mean',
      'median',
      'max',
      'min',
      'total',
      'credibility',
    ]);
  });

  it('reports observed skus that are not in the category', () => {
    const items: HistogramInput[] = [
      { sku: 'A', histogram: [0, 0, 1, 2, 9] },
      { sku: 'B', histogram: [2, 1, 3, 20, 60] },
    ];
    const result = calibrate(items, ['B', 'ghost', 'A'], {}, { asOf });
    expect(result.unmatched).toEqual(['ghost']);
    expect(result.matchedCount).toBe(2);
  });

  // Its speed is measured by `npm run bench -- calibration`, never by a timed test (CI runs under load).
  it('handles 2,000 items with over a thousand swap points and a curve of at most 2,000 points', () => {
    let seed = 12345;
    const rand = () => {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      return seed / 2147483648;
    };
    const items: HistogramInput[] = Array.from({ length: 2000 }, (_, i) => {
      const h: [number, number, number, number, number] = [0, 0, 0, 0, 0];
      const n = 1 + Math.floor(rand() * 300);
      const tilt = rand();
      for (let r = 0; r < n; r++) h[Math.min(4, Math.floor(rand() * 5 * (0.5 + tilt)))]!++;
      return { sku: `P${i}`, histogram: h };
    });
    const observed = observedAt(items, 37).reverse();
    const result = calibrate(items, observed, {}, { asOf });
    expect(result.swapPointCount).toBeGreaterThan(1000);
    expect(result.curve.length).toBeLessThanOrEqual(2000);
  });
});
