const SQRT_2PI = Math.sqrt(2 * Math.PI);

export function median(values: ArrayLike<number>): number {
  const n = values.length;
  if (n === 0) return Number.NaN;
  const sorted = Float64Array.from(values).sort();
  const mid = n >> 1;
  return n % 2 === 1 ? sorted[mid]! : (sorted[mid - 1]! + sorted[mid]!) / 2;
}

export function normalDensity(x: number): number {
  return Math.exp(-0.5 * x * x) / SQRT_2PI;
}

/** P(Z > x) for x >= 0, accurate in relative terms far into the tail. */
function upperTailNonNegative(x: number): number {
  if (x < 3) {
    // Taylor series of the integral: Phi(x) - 1/2 = phi(x) * sum x^(2n+1) / (2n+1)!!
    let term = x;
    let sum = x;
    const x2 = x * x;
    for (let n = 1; n < 200; n++) {
      term *= x2 / (2 * n + 1);
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return 0.5 - normalDensity(x) * sum;
  }
  // Mills ratio continued fraction, evaluated backwards; converges quickly for x >= 3.
  let t = x;
  for (let k = 120; k >= 1; k--) t = x + k / t;
  return normalDensity(x) / t;
}

export function normalCdf(x: number): number {
  return x >= 0 ? 1 - upperTailNonNegative(x) : upperTailNonNegative(-x);
}

/** Standard normal quantile: a rough start (Abramowitz & Stegun 26.2.23) polished by Newton steps. */
export function normalQuantile(p: number): number {
  if (Number.isNaN(p) || p < 0 || p > 1) return Number.NaN;
  if (p === 0) return Number.NEGATIVE_INFINITY;
  if (p === 1) return Number.POSITIVE_INFINITY;
  if (p === 0.5) return 0;
  const q = p < 0.5 ? p : 1 - p;
  const t = Math.sqrt(-2 * Math.log(q));
  let x = -(
    t -
    (2.515517 + 0.802853 * t + 0.010328 * t * t) /
      (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t)
  );
  // Solve Phi(x) = q on the lower tail, where Phi is computed with relative accuracy.
  for (let i = 0; i < 50; i++) {
    const step = (upperTailNonNegative(-x) - q) / normalDensity(x);
    x -= step;
    if (Math.abs(step) <= 1e-15 * Math.max(1, Math.abs(x))) break;
  }
  return p < 0.5 ? x : -x;
}

const LN_2PI = Math.log(2 * Math.PI);

/** log(n!) - log(sqrt(2 pi n) (n/e)^n), the error of Stirling's formula (Loader 2000). */
function stirlingError(n: number): number {
  if (n <= 15) {
    let logFact = 0;
    for (let j = 2; j <= n; j++) logFact += Math.log(j);
    return logFact - 0.5 * (LN_2PI + Math.log(n)) - n * Math.log(n) + n;
  }
  const nn = n * n;
  return (1 / 12 - (1 / 360 - (1 / 1260 - 1 / (1680 * nn)) / nn) / nn) / n;
}

/** x log(x / np) + np - x without cancellation when x is near np (Loader 2000). */
function deviance(x: number, np: number): number {
  if (Math.abs(x - np) < 0.1 * (x + np)) {
    let v = (x - np) / (x + np);
    let s = (x - np) * v;
    let ej = 2 * x * v;
    v *= v;
    for (let j = 1; j < 1000; j++) {
      ej *= v;
      const next = s + ej / (2 * j + 1);
      if (next === s) return s;
      s = next;
    }
    return s;
  }
  return x * Math.log(x / np) + np - x;
}

/** log P(X = x) for X ~ Binomial(size, p), 0 < p < 1, by Loader's saddle-point form. */
function binomialLogPmf(x: number, size: number, p: number): number {
  const q = 1 - p;
  if (x === 0) return size * Math.log1p(-p);
  if (x === size) return size * Math.log(p);
  const lc =
    stirlingError(size) -
    stirlingError(x) -
    stirlingError(size - x) -
    deviance(x, size * p) -
    deviance(size - x, size * q);
  return lc - 0.5 * (LN_2PI + Math.log(x) + Math.log1p(-x / size));
}

/**
 * P(X >= x) for X ~ Binomial(size, p). The terms are summed outwards from x on the side of the
 * smaller tail, starting from a log-space probability, so small tails keep their relative accuracy.
 */
export function binomialUpperTail(x: number, size: number, p: number): number {
  if (x <= 0) return 1;
  if (x > size || p <= 0) return 0;
  if (p >= 1) return 1;
  const odds = p / (1 - p);
  if (x > size * p) {
    let term = Math.exp(binomialLogPmf(x, size, p));
    let sum = term;
    for (let j = x; j < size; j++) {
      term *= ((size - j) / (j + 1)) * odds;
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return Math.min(1, sum);
  }
  // Lower tail P(X <= x-1) from its largest term downwards, then the complement.
  let term = Math.exp(binomialLogPmf(x - 1, size, p));
  let sum = term;
  for (let j = x - 1; j >= 1; j--) {
    term *= j / ((size - j + 1) * odds);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return Math.max(0, 1 - sum);
}

/**
 * One-sided exact conditional test for a rise in a rate (Przyborowski & Wilenski 1940): with
 * xWindow of nWindow reviews and xBase of nBase in the baseline one-star, and no change in the
 * rate, xWindow given xWindow + xBase is Binomial(xWindow + xBase, nWindow / (nWindow + nBase)).
 * Returns P(X >= xWindow) under that null and the expected count it centres on.
 */
export function conditionalRateTest(
  xWindow: number,
  nWindow: number,
  xBase: number,
  nBase: number,
): { pValue: number; expected: number } {
  const total = xWindow + xBase;
  const share = nWindow + nBase > 0 ? nWindow / (nWindow + nBase) : 0;
  return { pValue: binomialUpperTail(xWindow, total, share), expected: total * share };
}

export interface WilsonInterval {
  lower: number;
  upper: number;
}

/** Wilson (1927) score interval without continuity correction. */
export function wilsonInterval(successes: number, trials: number, z = 1.96): WilsonInterval {
  if (trials <= 0) return { lower: 0, upper: 1 };
  const p = successes / trials;
  const z2 = z * z;
  const denom = 1 + z2 / trials;
  const centre = (p + z2 / (2 * trials)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / trials + z2 / (4 * trials * trials));
  return { lower: Math.max(0, centre - half), upper: Math.min(1, centre + half) };
}

export function wilsonLowerBound(successes: number, trials: number, z = 1.96): number {
  if (trials <= 0) return 0;
  const p = successes / trials;
  const z2 = z * z;
  const denom = 1 + z2 / trials;
  const centre = (p + z2 / (2 * trials)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / trials + z2 / (4 * trials * trials));
  return Math.max(0, centre - half);
}
