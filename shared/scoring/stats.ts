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

/** P(X >= k) for X ~ Poisson(lambda). */
export function poissonUpperTail(k: number, lambda: number): number {
  if (k <= 0) return 1;
  if (lambda <= 0) return 0;
  let logFactK = 0;
  for (let j = 2; j <= k; j++) logFactK += Math.log(j);
  if (k > lambda) {
    let term = Math.exp(-lambda + k * Math.log(lambda) - logFactK);
    let sum = term;
    for (let j = k + 1; j < k + 10000; j++) {
      term *= lambda / j;
      sum += term;
      if (term < 1e-17 * sum) break;
    }
    return Math.min(1, sum);
  }
  // Lower sum P(X <= k-1) from its largest term downwards, then the complement.
  const top = k - 1;
  let term = Math.exp(-lambda + top * Math.log(lambda) - (logFactK - Math.log(k)));
  let sum = term;
  for (let j = top; j >= 1; j--) {
    term *= j / lambda;
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return Math.max(0, 1 - sum);
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
