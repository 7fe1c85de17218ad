import { describe, expect, it } from 'vitest';
import { kendallTauB, rankBiasedOverlap, spearmanRho } from '../../../shared/scoring/rank-stats';
import { scoreCategory } from '../../../shared/scoring/score-category';
import { wilsonInterval } from '../../../shared/scoring/stats';
import type { HistogramInput } from '../../../shared/scoring/types';

const Z95 = 1.959963984540054;

describe('Wilson score interval', () => {
  // Newcombe RG (1998) Two-sided confidence intervals for the single proportion: comparison of seven
  // methods. Statistics in Medicine 17:857–872, Table I, method 3 (score, no continuity correction).
  // Values from memory; they agree to the four decimals printed with the closed form below.
  it('reproduces Newcombe (1998) for 81/263: 0.2553 to 0.3662', () => {
    const { lower, upper } = wilsonInterval(81, 263, Z95);
    expect(lower).toBeCloseTo(0.2553, 4);
    expect(upper).toBeCloseTo(0.3662, 4);
  });

  it('reproduces Newcombe (1998) for 15/148: 0.0624 to 0.1605', () => {
    const { lower, upper } = wilsonInterval(15, 148, Z95);
    expect(lower).toBeCloseTo(0.0624, 4);
    expect(upper).toBeCloseTo(0.1605, 4);
  });

  it('reproduces Newcombe (1998) for 0/20: 0 to 0.1611 (from memory)', () => {
    const { lower, upper } = wilsonInterval(0, 20, Z95);
    expect(lower).toBe(0);
    expect(upper).toBeCloseTo(0.1611, 4);
  });

  it('reproduces Newcombe (1998) for 1/29: 0.0061 to 0.1718 (from memory)', () => {
    const { lower, upper } = wilsonInterval(1, 29, Z95);
    expect(lower).toBeCloseTo(0.0061, 4);
    expect(upper).toBeCloseTo(0.1718, 4);
  });
});

describe('rank correlations', () => {
  // SciPy documentation, scipy.stats.kendalltau example (tau-b, ties on both sides); value from memory.
  it('matches the scipy.stats.kendalltau docs example with ties: -0.47140452079103173', () => {
    expect(kendallTauB([12, 2, 1, 12, 2], [1, 4, 7, 1, 0])).toBeCloseTo(-0.47140452079103173, 14);
  });

  // SciPy documentation, scipy.stats.spearmanr example (average ranks for the tied 7s); value from memory.
  it('matches the scipy.stats.spearmanr docs example: 0.8207826816681233', () => {
    expect(spearmanRho([1, 2, 3, 4, 5], [5, 6, 7, 8, 7])).toBeCloseTo(0.8207826816681233, 14);
  });

  // Kendall MG (1938) Biometrika 30:81–93 defines tau = (concordant - discordant) / (n(n-1)/2):
  // reversing one adjacent pair of 5 leaves 9 concordant, 1 discordant, tau = 0.8.
  it('gives tau 0.8 for one adjacent swap in five (Kendall 1938 definition)', () => {
    expect(kendallTauB([1, 2, 3, 4, 5], [1, 2, 3, 5, 4])).toBeCloseTo(0.8, 14);
  });

  // Spearman's formula without ties, rho = 1 - 6 sum d^2 / (n(n^2 - 1)) (Spearman 1904):
  // d = (0,0,0,1,-1) gives 1 - 12/120 = 0.9.
  it('gives rho 0.9 for one adjacent swap in five (Spearman 1904 formula)', () => {
    expect(spearmanRho([1, 2, 3, 4, 5], [1, 2, 3, 5, 4])).toBeCloseTo(0.9, 14);
  });
});

describe('rank-biased overlap', () => {
  // Webber, Moffat & Zobel (2010) A similarity measure for indefinite rankings. ACM TOIS 28(4), article 20.
  // Eq. 32: RBO_ext = A_k p^k + (1-p)/p * sum_{d=1..k} A_d p^d, with A_d the overlap share at depth d.
  const ids = Array.from({ length: 20 }, (_, i) => i);

  it('is exactly 1 (extrapolated) for identical lists, and 1 - p^k truncated at depth k', () => {
    const rbo = rankBiasedOverlap(ids, ids, 0.9);
    expect(rbo.extrapolated).toBeCloseTo(1, 14);
    expect(rbo.truncated).toBeCloseTo(1 - 0.9 ** 20, 14);
  });

  // Swapping the top two of otherwise identical lists: A_1 = 0 and A_d = 1 for d >= 2, so
  // RBO_ext = p^k + (1-p)/p * (sum_{d=1..k} p^d - p) = 1 - (1-p): exactly p, whatever the depth k >= 2.
  it('drops by exactly 1 - p when only the top two are swapped', () => {
    const swapped = [1, 0, ...ids.slice(2)];
    for (const p of [0.5, 0.9, 0.98]) {
      const rbo = rankBiasedOverlap(ids, swapped, p);
      expect(rbo.extrapolated).toBeCloseTo(p, 14);
      expect(rbo.truncated).toBeCloseTo(1 - p ** 20 - (1 - p), 14);
    }
  });

  it('is 0 for disjoint lists', () => {
    const other = ids.map((i) => i + 20);
    const rbo = rankBiasedOverlap(ids, other, 0.9);
    expect(rbo.extrapolated).toBe(0);
    expect(rbo.truncated).toBe(0);
  });
});

describe('shrinkage towards the grand mean', () => {
  // Efron B & Morris C (1977) Stein's paradox in statistics. Scientific American 236(5):119–127.
  // Eighteen 1970 batters: hits in their first 45 at-bats and the batting average over the rest of the
  // season. All figures from memory. The article's James–Stein estimate shrinks every average towards
  // the grand mean .265 with factor c = .212 and has a far smaller total squared error against the
  // rest-of-season averages than the raw averages do.
  const players: [string, number, number][] = [
    ['Clemente', 18, 0.346],
    ['F. Robinson', 17, 0.298],
    ['F. Howard', 16, 0.276],
    ['Johnstone', 15, 0.222],
    ['Berry', 14, 0.273],
    ['Spencer', 14, 0.27],
    ['Kessinger', 13, 0.263],
    ['L. Alvarado', 12, 0.21],
    ['Santo', 11, 0.269],
    ['Swoboda', 11, 0.23],
    ['Unser', 10, 0.264],
    ['Williams', 10, 0.256],
    ['Scott', 10, 0.303],
    ['Petrocelli', 10, 0.264],
    ['E. Rodriguez', 10, 0.226],
    ['Campaneris', 9, 0.285],
    ['Munson', 8, 0.316],
    ['Alvis', 7, 0.2],
  ];
  // A hit is coded as 5 stars and an out as 1 star: the Bayesian average is affine-equivariant,
  // so averages map back through (stars - 1) / 4.
  const items: HistogramInput[] = players.map(([name, hits]) => ({
    sku: name,
    histogram: [45 - hits, 0, 0, 0, hits],
  }));
  const toAverage = (stars: number) => (stars - 1) / 4;
  const result = scoreCategory(items, { priorWeightStrategy: 'credibility' }, { asOf: '1970-12-31' });

  it('puts the prior mean at the grand mean .265', () => {
    expect(toAverage(result.resolved.C)).toBeCloseTo(215 / 810, 12);
    expect(toAverage(result.resolved.C)).toBeCloseTo(0.265, 3);
  });

  it('holds the article’s data: James–Stein c = 1 - (k-3) s2 / sum (y - mean)^2 comes to .212', () => {
    const averages = players.map(([, hits]) => hits / 45);
    const grand = averages.reduce((a, b) => a + b, 0) / averages.length;
    const spread = averages.reduce((a, y) => a + (y - grand) ** 2, 0);
    const c = 1 - ((players.length - 3) * (grand * (1 - grand))) / 45 / spread;
    expect(c).toBeCloseTo(0.212, 3);
  });

  it('shrinks every player by one common factor n/(n+m), stronger than James–Stein', () => {
    const C = result.resolved.C;
    const factors = result.items.map((it) => (it.smoothed - C) / (it.rawMean! - C));
    for (const f of factors) expect(f).toBeCloseTo(factors[0]!, 12);
    expect(factors[0]!).toBeCloseTo(45 / (45 + result.resolved.m), 12);
    // Bühlmann's method of moments subtracts (k-1) EPV where James–Stein subtracts (k-3) s2,
    // so with k = 18 its factor sits below the article's .212 but keeps the direction.
    expect(factors[0]!).toBeGreaterThan(0);
    expect(factors[0]!).toBeLessThan(0.212);
    const clemente = result.items.find((it) => it.sku === 'Clemente')!;
    expect(toAverage(clemente.smoothed)).toBeGreaterThan(0.265);
    expect(toAverage(clemente.smoothed)).toBeLessThan(0.294);
    const alvis = result.items.find((it) => it.sku === 'Alvis')!;
    expect(toAverage(alvis.smoothed)).toBeLessThan(0.265);
    expect(toAverage(alvis.smoothed)).toBeGreaterThan(7 / 45);
  });

  it('predicts the rest of the season better than the raw averages, as the article reports', () => {
    let rawError = 0;
    let shrunkError = 0;
    for (const [name, , later] of players) {
      const it = result.items.find((x) => x.sku === name)!;
      rawError += (toAverage(it.rawMean!) - later) ** 2;
      shrunkError += (toAverage(it.smoothed) - later) ** 2;
    }
    expect(shrunkError).toBeLessThan(rawError / 2.5);
  });

  it('keeps the order of players with equal at-bats', () => {
    const byRaw = [...result.items].sort((a, b) => b.rawMean! - a.rawMean!).map((x) => x.sku);
    const bySmooth = [...result.items].sort((a, b) => b.smoothed - a.smoothed).map((x) => x.sku);
    expect(bySmooth).toEqual(byRaw);
  });
});
