/** Bayesian average (m*C + sum of stars) / (m + n); with no evidence and m = 0, the prior mean. */
export function smoothedScore(m: number, C: number, n: number, sumStars: number): number {
  const d = m + n;
  return d > 0 ? (m * C + sumStars) / d : C;
}

/** An exact binary fraction num * 2^exp; every finite double is one. */
interface Dyadic {
  num: bigint;
  exp: number;
}

const bits = new DataView(new ArrayBuffer(8));

function dyadic(x: number): Dyadic {
  bits.setFloat64(0, x);
  const hi = bits.getUint32(0);
  const lo = bits.getUint32(4);
  const biased = (hi >>> 20) & 0x7ff;
  let num = (BigInt(hi & 0xfffff) << 32n) | BigInt(lo);
  if (biased !== 0) num |= 1n << 52n;
  if (hi >>> 31) num = -num;
  return { num, exp: biased === 0 ? -1074 : biased - 1075 };
}

function add(a: Dyadic, b: Dyadic): Dyadic {
  if (a.exp <= b.exp) return { num: a.num + (b.num << BigInt(b.exp - a.exp)), exp: a.exp };
  return add(b, a);
}

function mul(a: Dyadic, b: Dyadic): Dyadic {
  return { num: a.num * b.num, exp: a.exp + b.exp };
}

function neg(a: Dyadic): Dyadic {
  return { num: -a.num, exp: a.exp };
}

/** floor(a / b) for a >= 0, b > 0. */
function floorDiv(a: Dyadic, b: Dyadic): bigint {
  const shift = a.exp - b.exp;
  return shift >= 0 ? (a.num << BigInt(shift)) / b.num : a.num / (b.num << BigInt(-shift));
}

const SAFE = 2n ** 53n;

/** The smallest double at or above a whole k >= 1: k itself up to 2^53. */
function doubleAtLeast(k: bigint): number {
  if (k <= SAFE) return Number(k);
  const shift = k.toString(2).length - 53;
  let top = k >> BigInt(shift);
  if (top << BigInt(shift) < k) top += 1n;
  return Number(top) * 2 ** shift;
}

/**
 * Smallest whole k >= 1 with (m*C + S + v*k) / (m + n + k) > above, holding m and C fixed, solved in
 * exact rational arithmetic on the inputs as the binary fractions they are: k*(v - above) must exceed
 * above*(m + n) - m*C - S. Null only when v <= above: every new score is then a weighted average of
 * the current score and v, so the item can at best approach `above`. At least one review is asked for
 * even where the scores tie, since the tie-break lists the item below. Beyond 2^53 the answer is the
 * smallest double at or above the exact k, a count that always suffices.
 */
export function reviewsToPass(
  m: number,
  C: number,
  n: number,
  sumStars: number,
  above: number,
  v: number,
): number | null {
  if (!(v > above)) return null;
  const target = dyadic(above);
  const deficit = add(
    mul(target, add(dyadic(m), dyadic(n))),
    neg(add(mul(dyadic(m), dyadic(C)), dyadic(sumStars))),
  );
  if (deficit.num < 0n) return 1;
  const k = floorDiv(deficit, add(dyadic(v), neg(target))) + 1n;
  return doubleAtLeast(k);
}
