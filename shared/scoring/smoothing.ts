/** Bayesian average (m*C + sum of stars) / (m + n); with no evidence and m = 0, the prior mean. */
export function smoothedScore(m: number, C: number, n: number, sumStars: number): number {
  const d = m + n;
  return d > 0 ? (m * C + sumStars) / d : C;
}

/**
 * Smallest whole k >= 1 with (m*C + S + v*k) / (m + n + k) > above, holding m and C fixed.
 * Null when no k suffices: every new score is a weighted average of the current score and v,
 * so with v <= above the item can at best approach `above`. At least one review is asked for
 * even where the scores tie, since the tie-break lists the item below.
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
  const works = (k: number) => (m * C + sumStars + v * k) / (m + n + k) > above;
  const deficit = above * (m + n) - (m * C + sumStars);
  let k = deficit < 0 ? 1 : Math.max(1, Math.floor(deficit / (v - above)) + 1);
  if (!Number.isFinite(k)) return null;
  // Beyond 2^53 whole numbers are not exact; the closed form is the answer there.
  if (k > Number.MAX_SAFE_INTEGER) return k;
  // The closed form can be off by one through rounding; settle on the exact smallest k.
  for (let step = 0; step < 64 && k > 1 && works(k - 1); step++) k--;
  for (let step = 0; step < 64 && !works(k); step++) k++;
  // v within rounding of `above`: no finite k can be shown to work.
  return works(k) ? k : null;
}
