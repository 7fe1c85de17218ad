import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { scoreCategory } from '../../../shared/scoring/score-category';
import { reviewsToPass, smoothedScore } from '../../../shared/scoring/smoothing';

/*
 * Checks by exact rational arithmetic, independent of the engine's own conversion: a finite double is
 * turned into a fraction by doubling it until it is whole (each doubling is exact), and the inequality
 * (m*C + S + v*k) / (m + n + k) > above is tested by BigInt cross-multiplication.
 */
interface Fraction {
  n: bigint;
  d: bigint;
}

function fraction(x: number): Fraction {
  let y = x;
  let d = 1n;
  while (!Number.isInteger(y)) {
    y *= 2;
    d *= 2n;
  }
  return { n: BigInt(y), d };
}
const plus = (a: Fraction, b: Fraction): Fraction => ({ n: a.n * b.d + b.n * a.d, d: a.d * b.d });
const times = (a: Fraction, b: Fraction): Fraction => ({ n: a.n * b.n, d: a.d * b.d });
const whole = (k: bigint): Fraction => ({ n: k, d: 1n });

interface Case {
  m: number;
  C: number;
  n: number;
  S: number;
  above: number;
  v: number;
}

/** (m*C + S + v*k) * 1 > above * (m + n + k), both sides exact fractions with positive denominators. */
function lifts(c: Case, k: bigint): boolean {
  const m = fraction(c.m);
  const num = plus(plus(times(m, fraction(c.C)), fraction(c.S)), times(fraction(c.v), whole(k)));
  const den = plus(plus(m, fraction(c.n)), whole(k));
  const rhs = times(fraction(c.above), den);
  return num.n * rhs.d > rhs.n * num.d;
}

/** Smallest k >= 1 that lifts, by doubling then bisection on exact fractions. */
function exactK(c: Case): bigint {
  if (lifts(c, 1n)) return 1n;
  let lo = 1n;
  let hi = 2n;
  while (!lifts(c, hi)) {
    lo = hi;
    hi *= 2n;
  }
  while (hi - lo > 1n) {
    const mid = (lo + hi) / 2n;
    if (lifts(c, mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

const run = (c: Case) => reviewsToPass(c.m, c.C, c.n, c.S, c.above, c.v);

// The floating-point closed form with a ±64 search answered `null` ("impossible") for the first
// case and an unchecked, too small value for the third.
const nearBillion: Case = { m: 1e9, C: 4.5, n: 1e9, S: 4e9, above: 5 - 1e-4, v: 5 };
const nearTrillion: Case = { m: 5e11, C: 4.2, n: 1e12 + 39, S: 4.1e12 + 7, above: 4.99, v: 5 };
const beyondSafe: Case = { m: 1e12, C: 4.5, n: 1e12, S: 4e12, above: 5 - 1e-6, v: 5 };

describe('what it would take, in exact rational arithmetic', () => {
  it.each([
    ['n = 1e9', nearBillion],
    ['n = 1e12 + 39', nearTrillion],
  ])('%s: the answer lifts the item and one review fewer does not', (_, c) => {
    const k = run(c);
    expect(k).not.toBeNull();
    expect(Number.isSafeInteger(k)).toBe(true);
    expect(lifts(c, BigInt(k!))).toBe(true);
    expect(lifts(c, BigInt(k!) - 1n)).toBe(false);
    expect(BigInt(k!)).toBe(exactK(c));
  });

  it('beyond 2^53 answers the smallest double at or above the exact k', () => {
    const exact = exactK(beyondSafe);
    expect(exact > 2n ** 53n).toBe(true);
    expect(lifts(beyondSafe, exact - 1n)).toBe(false);
    const k = run(beyondSafe)!;
    expect(BigInt(k) >= exact).toBe(true);
    expect(lifts(beyondSafe, BigInt(k))).toBe(true);
    // The next double down (k is above 2^53, so one step is k * 2^-53 rounded to a power of two).
    const below = k - 2 ** (Math.floor(Math.log2(k)) - 52);
    expect(BigInt(below) < exact).toBe(true);
  });

  it('is impossible only when v is not above the score to beat', () => {
    expect(run({ ...nearBillion, above: 5 })).toBeNull();
    expect(run({ ...nearBillion, v: 4, above: 4 })).toBeNull();
    expect(run({ ...nearBillion, above: 5 - 2 ** -50 })).not.toBeNull();
  });

  it('asks for reviews, not "impossible", for an item with a billion reviews', () => {
    const res = scoreCategory(
      [
        { sku: 'leader', count: 1e9, mean: 5 - 1e-4 },
        { sku: 'second', count: 1e9, mean: 4 },
      ],
      { priorWeightStrategy: 'fixed', priorWeightValue: 1, priorMeanStrategy: 'fixed', priorMeanValue: 4.5 },
      { asOf: '2026-11-30' },
    );
    const second = res.items.find((it) => it.sku === 'second')!;
    expect(second.whatItTakes).toBe('reviews');
    const c: Case = { m: 1, C: 4.5, n: 1e9, S: 4e9, above: second.aboveScore!, v: 5 };
    expect(BigInt(second.reviewsToPass!)).toBe(exactK(c));
  });

  it('finds the smallest k that lifts the item above, or none when v <= s_above (DESIGN §4.7)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e6, noNaN: true }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        fc.integer({ min: 0, max: 2 ** 40 }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        fc.double({ min: 0, max: 2, noNaN: true }),
        fc.integer({ min: 1, max: 5 }),
        (m, C, n, r, gap, v) => {
          const c: Case = { m, C, n, S: n * r, above: Math.min(5, smoothedScore(m, C, n, n * r) + gap), v };
          const k = run(c);
          if (v <= c.above) {
            expect(k).toBeNull();
            return;
          }
          expect(k).not.toBeNull();
          expect(lifts(c, BigInt(k!))).toBe(true);
          if (k! <= Number.MAX_SAFE_INTEGER && k! > 1) expect(lifts(c, BigInt(k!) - 1n)).toBe(false);
        },
      ),
      { numRuns: 300 },
    );
  });
});
