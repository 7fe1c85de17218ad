import normalQuantileStdlib from '@stdlib/stats-base-dists-normal-quantile';
import fc from 'fast-check';
import { median as ssMedian, probit, sampleRankCorrelation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { kendallTauB, spearmanRho } from '../../../shared/scoring/rank-stats';
import { median, normalCdf, normalQuantile } from '../../../shared/scoring/stats';

/** O(n^2) tau-b straight from the definition (Kendall 1945), as a reference for the O(n log n) one. */
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

const tiedValues = fc.array(fc.tuple(fc.integer({ min: 0, max: 6 }), fc.integer({ min: 0, max: 6 })), {
  minLength: 2,
  maxLength: 60,
});

describe('normal quantile', () => {
  it('checks the references first: simple-statistics probit is too coarse, @stdlib is not', () => {
    // simple-statistics inverts erf with a closed-form approximation: at p = 0.001 it is off by about
    // 0.01, so it cannot serve as a reference to 4 decimals. @stdlib agrees with the textbook
    // z(0.975) = 1.959964 and z(0.95) = 1.644854 (Abramowitz & Stegun, Table 26.5; from memory).
    expect(Math.abs(probit(0.001) - normalQuantileStdlib(0.001, 0, 1))).toBeGreaterThan(1e-3);
    expect(normalQuantileStdlib(0.975, 0, 1)).toBeCloseTo(1.959964, 6);
    expect(normalQuantileStdlib(0.95, 0, 1)).toBeCloseTo(1.644854, 6);
  });

  it('agrees with @stdlib to 1e-9 for p in [1e-8, 1 - 1e-8]', () => {
    fc.assert(
      fc.property(fc.double({ min: 1e-8, max: 1 - 1e-8, noNaN: true }), (p) => {
        const ours = normalQuantile(p);
        const ref = normalQuantileStdlib(p, 0, 1);
        expect(Math.abs(ours - ref)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(ref)));
      }),
      { numRuns: 2000 },
    );
  });

  // Deeper in the tail @stdlib drifts (1e-8 at p = 1e-10, and -8.292 for p = 2.8e-17 where the answer
  // is -8.374), so the references there are Wichura's AS241 values as printed by Python 3's
  // statistics.NormalDist().inv_cdf, checked in this repository's development session.
  it('matches AS241 (Wichura 1988) deep in the tail, where @stdlib loses digits', () => {
    expect(normalQuantile(1e-10)).toBeCloseTo(-6.361340902404056, 12);
    expect(normalQuantile(1e-5)).toBeCloseTo(-4.2648907939228256, 12);
    expect(normalQuantile(2.775557561562892e-17)).toBeCloseTo(-8.374388923067455, 11);
    expect(normalQuantileStdlib(1e-10, 0, 1)).not.toBeCloseTo(-6.361340902404056, 9);
  });

  it('inverts its own CDF', () => {
    for (const p of [1e-300, 1e-40, 1e-10, 0.001, 0.025, 0.3, 0.5, 0.7, 0.975, 0.999]) {
      expect(Math.abs(normalCdf(normalQuantile(p)) - p)).toBeLessThanOrEqual(1e-12 * p);
    }
  });
});

describe('medians', () => {
  it('agree with simple-statistics on random data', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 200 }),
        (xs) => {
          expect(median(xs)).toBeCloseTo(ssMedian(xs), 9);
        },
      ),
    );
  });
});

describe('rank correlations', () => {
  it('Spearman agrees with simple-statistics sampleRankCorrelation (average ranks) on tied data', () => {
    fc.assert(
      fc.property(tiedValues, (pairs) => {
        const x = pairs.map((p) => p[0]);
        const y = pairs.map((p) => p[1]);
        const ours = spearmanRho(x, y);
        const ref = sampleRankCorrelation(x, y);
        if (ours === null) expect(Number.isFinite(ref)).toBe(false);
        else expect(ours).toBeCloseTo(ref, 10);
      }),
      { numRuns: 500 },
    );
  });

  // simple-statistics has no Kendall's tau: the reference is the pairwise definition of tau-b.
  it('Kendall tau-b in O(n log n) equals the pairwise definition on tied data', () => {
    fc.assert(
      fc.property(tiedValues, (pairs) => {
        const x = pairs.map((p) => p[0]);
        const y = pairs.map((p) => p[1]);
        const ours = kendallTauB(x, y);
        const ref = tauBByPairs(x, y);
        if (ref === null) expect(ours).toBeNull();
        else expect(ours).toBeCloseTo(ref, 12);
      }),
      { numRuns: 500 },
    );
  });
});
