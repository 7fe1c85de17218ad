const REL_TOL = 1e-12;

/** Scores this close are one tie: mathematically equal smoothed scores can differ in the last bits. */
export function sameScore(a: number, b: number): boolean {
  if (a === b) return true;
  if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) && Number.isNaN(b);
  return Math.abs(a - b) <= REL_TOL * Math.max(Math.abs(a), Math.abs(b));
}

/**
 * Listing order for a ranking. Tie-break, in order: score descending (missing scores last),
 * review count descending, sku ascending by UTF-16 code units (locale-independent).
 */
export function orderByScore(
  scores: Float64Array,
  counts: Float64Array,
  skus: readonly string[],
): Uint32Array {
  const order = new Uint32Array(scores.length);
  for (let i = 0; i < order.length; i++) order[i] = i;
  order.sort((a, b) => {
    const sa = scores[a]!;
    const sb = scores[b]!;
    const aMissing = Number.isNaN(sa);
    const bMissing = Number.isNaN(sb);
    if (aMissing !== bMissing) return aMissing ? 1 : -1;
    if (!aMissing && !sameScore(sa, sb)) return sb - sa;
    const ca = counts[a]!;
    const cb = counts[b]!;
    if (ca !== cb) return cb - ca;
    const ka = skus[a]!;
    const kb = skus[b]!;
    return ka < kb ? -1 : ka > kb ? 1 : 0;
  });
  return order;
}

/** Standard competition ranks (1, 2, 2, 4) along a listing order; equal scores share a rank. */
export function competitionRanks(order: Uint32Array, scores: Float64Array): Uint32Array {
  const ranks = new Uint32Array(order.length);
  for (let p = 0; p < order.length; p++) {
    const i = order[p]!;
    if (p > 0 && sameScore(scores[i]!, scores[order[p - 1]!]!)) ranks[i] = ranks[order[p - 1]!]!;
    else ranks[i] = p + 1;
  }
  return ranks;
}

/** Ascending ranks 1..n with ties given the average of the ranks they span. */
export function averageRanks(values: ArrayLike<number>): Float64Array {
  const n = values.length;
  const idx = new Uint32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  idx.sort((a, b) => values[a]! - values[b]!);
  const ranks = new Float64Array(n);
  let i = 0;
  while (i < n) {
    let j = i;
    while (j + 1 < n && values[idx[j + 1]!] === values[idx[i]!]) j++;
    const r = (i + j) / 2 + 1;
    for (let k = i; k <= j; k++) ranks[idx[k]!] = r;
    i = j + 1;
  }
  return ranks;
}

export function pearson(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  const n = x.length;
  if (n < 2 || y.length !== n) return null;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i]!;
    my += y[i]!;
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i]! - mx;
    const dy = y[i]! - my;
    sxy += dx * dy;
    sxx += dx * dx;
    syy += dy * dy;
  }
  if (sxx === 0 || syy === 0) return null;
  return Math.max(-1, Math.min(1, sxy / Math.sqrt(sxx * syy)));
}

/** Spearman's rho: Pearson's correlation of average ranks. Null when either side is constant. */
export function spearmanRho(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  if (x.length !== y.length || x.length < 2) return null;
  return pearson(averageRanks(x), averageRanks(y));
}

export interface KendallParts {
  /** Concordant minus discordant pairs. */
  numerator: number;
  pairs: number;
  tiedX: number;
  tiedY: number;
  tiedBoth: number;
  tauB: number | null;
}

/** Kendall's tau-b in O(n log n) (Knight 1966): sort by x then y, count exchanges of a merge sort on y. */
export function kendallParts(x: ArrayLike<number>, y: ArrayLike<number>): KendallParts {
  const n = x.length;
  const idx = new Uint32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  idx.sort((a, b) => x[a]! - x[b]! || y[a]! - y[b]!);
  return kendallFromSorted(idx, x, y);
}

/** Stable counting sort of ids by an integer key in 0..maxKey. */
function countingSort(ids: Uint32Array, key: ArrayLike<number>, maxKey: number): Uint32Array {
  const counts = new Uint32Array(maxKey + 2);
  for (let i = 0; i < ids.length; i++) counts[key[ids[i]!]! + 1]!++;
  for (let k = 1; k < counts.length; k++) counts[k]! += counts[k - 1]!;
  const out = new Uint32Array(ids.length);
  for (let i = 0; i < ids.length; i++) out[counts[key[ids[i]!]!]!++] = ids[i]!;
  return out;
}

/** Kendall's tau-b of two rankings given as whole numbers 1..n, ordered in O(n) by counting sorts. */
export function kendallPartsOfRanks(x: Uint32Array, y: Uint32Array): KendallParts {
  const n = x.length;
  const ids = new Uint32Array(n);
  for (let i = 0; i < n; i++) ids[i] = i;
  return kendallFromSorted(countingSort(countingSort(ids, y, n), x, n), x, y);
}

/** Spearman's rho of two competition rankings (1..n): tied items get the mean of the places they span. */
export function spearmanRhoOfRanks(x: Uint32Array, y: Uint32Array): number | null {
  if (x.length !== y.length || x.length < 2) return null;
  return pearson(averageOfCompetition(x), averageOfCompetition(y));
}

function averageOfCompetition(ranks: Uint32Array): Float64Array {
  const n = ranks.length;
  const size = new Uint32Array(n + 1);
  for (let i = 0; i < n; i++) size[ranks[i]!]!++;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = ranks[i]! + (size[ranks[i]!]! - 1) / 2;
  return out;
}

/**
 * Inversions of `a` (pairs i < j with a[j] < a[i]), counted by a bottom-up merge sort in O(n log n). `a` and
 * `scratch` (same length) are both overwritten; `sorted` is whichever of the two ends up holding the values
 * in ascending order.
 */
export function mergeInversions<T extends Float64Array | Uint32Array>(
  a: T,
  scratch: T,
): { count: number; sorted: T } {
  const n = a.length;
  let from = a;
  let to = scratch;
  let count = 0;
  for (let width = 1; width < n; width *= 2) {
    for (let lo = 0; lo < n; lo += 2 * width) {
      const mid = Math.min(lo + width, n);
      const hi = Math.min(lo + 2 * width, n);
      let i = lo;
      let j = mid;
      let k = lo;
      while (i < mid && j < hi) {
        if (from[j]! < from[i]!) {
          to[k++] = from[j++]!;
          count += mid - i;
        } else to[k++] = from[i++]!;
      }
      while (i < mid) to[k++] = from[i++]!;
      while (j < hi) to[k++] = from[j++]!;
    }
    const t = from;
    from = to;
    to = t;
  }
  return { count, sorted: from };
}

function kendallFromSorted(idx: Uint32Array, x: ArrayLike<number>, y: ArrayLike<number>): KendallParts {
  const n = idx.length;
  const pairs = (n * (n - 1)) / 2;
  let tiedX = 0;
  let tiedBoth = 0;
  let runX = 1;
  let runXY = 1;
  for (let k = 1; k <= n; k++) {
    const sameX = k < n && x[idx[k]!] === x[idx[k - 1]!];
    const sameXY = sameX && y[idx[k]!] === y[idx[k - 1]!];
    if (sameXY) runXY++;
    else {
      tiedBoth += (runXY * (runXY - 1)) / 2;
      runXY = 1;
    }
    if (sameX) runX++;
    else {
      tiedX += (runX * (runX - 1)) / 2;
      runX = 1;
    }
  }
  const values = new Float64Array(n);
  for (let k = 0; k < n; k++) values[k] = y[idx[k]!]!;
  const { count: swaps, sorted: a } = mergeInversions(values, new Float64Array(n));
  let tiedY = 0;
  let runY = 1;
  for (let k = 1; k <= n; k++) {
    if (k < n && a[k] === a[k - 1]) runY++;
    else {
      tiedY += (runY * (runY - 1)) / 2;
      runY = 1;
    }
  }
  const numerator = pairs - tiedX - tiedY + tiedBoth - 2 * swaps;
  const denom = Math.sqrt((pairs - tiedX) * (pairs - tiedY));
  const tauB = denom > 0 ? Math.max(-1, Math.min(1, numerator / denom)) : null;
  return { numerator, pairs, tiedX, tiedY, tiedBoth, tauB };
}

export function kendallTauB(x: ArrayLike<number>, y: ArrayLike<number>): number | null {
  if (x.length !== y.length || x.length < 2) return null;
  return kendallParts(x, y).tauB;
}

export interface RankBiasedOverlap {
  p: number;
  depth: number;
  /** RBO@depth: (1-p) * sum_{d<=depth} p^(d-1) A_d, a lower bound on full RBO. */
  truncated: number;
  /** RBO_ext (Webber, Moffat & Zobel 2010, eq. 32): extrapolates the agreement at depth to infinity. */
  extrapolated: number;
}

/**
 * Rank-biased overlap of two listings of the same length over ids 0..idCount-1.
 * A_d is the share of the top d of one listing found in the top d of the other.
 */
export function rankBiasedOverlap(
  a: ArrayLike<number>,
  b: ArrayLike<number>,
  p = 0.9,
  idCount = Math.max(a.length, b.length) === 0 ? 0 : Math.max(maxOf(a), maxOf(b)) + 1,
): RankBiasedOverlap {
  const depth = Math.min(a.length, b.length);
  const inA = new Uint8Array(idCount);
  const inB = new Uint8Array(idCount);
  let overlap = 0;
  let weighted = 0;
  let pd = 1;
  for (let d = 1; d <= depth; d++) {
    const x = a[d - 1]!;
    const y = b[d - 1]!;
    if (x === y) overlap++;
    else {
      if (inB[x]) overlap++;
      if (inA[y]) overlap++;
    }
    inA[x] = 1;
    inB[y] = 1;
    pd *= p;
    weighted += (overlap / d) * pd;
  }
  if (depth === 0) return { p, depth, truncated: 0, extrapolated: 0 };
  const scale = (1 - p) / p;
  return {
    p,
    depth,
    truncated: scale * weighted,
    extrapolated: (overlap / depth) * pd + scale * weighted,
  };
}

function maxOf(values: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < values.length; i++) if (values[i]! > m) m = values[i]!;
  return m;
}

/** Number of ids found in the first `depth` entries of both listings. */
export function topOverlap(a: ArrayLike<number>, b: ArrayLike<number>, depth: number): number {
  const k = Math.min(depth, a.length, b.length);
  const seen = new Set<number>();
  for (let i = 0; i < k; i++) seen.add(a[i]!);
  let shared = 0;
  for (let i = 0; i < k; i++) if (seen.has(b[i]!)) shared++;
  return shared;
}
