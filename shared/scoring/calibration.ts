import { categoryMoments, priorMean, priorWeightFor } from './prior';
import { mergeInversions, orderByScore } from './rank-stats';
import { priorWeightStrategies, resolveSettings } from './settings';
import type { PriorWeightStrategy, ScoringSettings } from './settings';
import { toColumns } from './summary';
import type { ItemInput } from './types';

export interface CalibrationOptions {
  asOf: string | Date;
  /** Longer curves are condensed to this many points, each the best step of a run of steps. */
  maxCurvePoints?: number;
  unexplainedCount?: number;
  /** Called now and then with the share of the search done, 0 to 1 (the browser's progress bar). */
  onProgress?: (share: number) => void;
  /** Tuning of the swap-point search; the defaults suit every size (tests lower them). */
  search?: Omit<PriorWeightSearchOptions, 'onProgress'>;
}

export interface CurveStep {
  start: number;
  /** Null: the step runs to infinity. */
  end: number | null;
  tau: number | null;
}

export interface StrategyOnCurve {
  strategy: PriorWeightStrategy;
  m: number | null;
  tau: number | null;
  start: number | null;
  end: number | null;
}

export interface UnexplainedItem {
  sku: string;
  observedPosition: number;
  fittedPosition: number;
  /** observed - fitted: positive when the observed ordering lists the item lower than the best fit. */
  gap: number;
}

export interface CalibrationResult {
  C: number;
  matchedCount: number;
  /** Skus of the observed ordering not found among the items. */
  unmatched: string[];
  swapPointCount: number;
  curve: CurveStep[];
  curveExact: boolean;
  best: CurveStep & { point: number; tiedSteps: number };
  strategies: StrategyOnCurve[];
  unexplained: UnexplainedItem[];
}

/** Swap points closer than this (relative) are one crossing of several lines through a common point. */
const GROUP_TOL = 1e-10;
/** A bracket narrower than this (relative) is listed whatever its size: it cannot usefully be split. */
const NARROW = 1e-9;
/** A bracket boundary m is clean when no pair crosses within this (relative) of it. */
const CLEAN = 1e-9;

function representative(start: number, end: number | null): number {
  if (end === null) return start > 0 ? 2 * start : 1;
  if (start === 0) return end / 2;
  return Math.sqrt(start * end);
}

const littleEndian = new Uint8Array(new Float64Array([1]).buffer)[7] === 0x3f;

/**
 * Indices 0..N-1 by key descending, equal keys by index ascending: a stable LSD radix sort on the key's
 * bits (four 16-bit digits), O(N), with no comparator calls.
 */
function orderByKeyDescending(keys: Float64Array): Uint32Array {
  const N = keys.length;
  if (N < 2048) {
    // Small: a comparator sort is cheaper than four passes over 65,536 buckets, same order.
    const order = new Uint32Array(N);
    for (let k = 0; k < N; k++) order[k] = k;
    return order.sort((a, b) => keys[b]! - keys[a]! || a - b);
  }
  const f = new Float64Array(N);
  for (let k = 0; k < N; k++) f[k] = keys[k]! + 0; // -0 and +0 are one key
  const words = new Uint32Array(f.buffer);
  const hiAt = littleEndian ? 1 : 0;
  const hi = new Uint32Array(N);
  const lo = new Uint32Array(N);
  for (let k = 0; k < N; k++) {
    const h = words[2 * k + hiAt]!;
    const l = words[2 * k + 1 - hiAt]!;
    // Bits that sort descending as unsigned integers: negatives keep theirs, non-negatives flip.
    if (h & 0x80000000) {
      hi[k] = h;
      lo[k] = l;
    } else {
      hi[k] = (h ^ 0x7fffffff) >>> 0;
      lo[k] = ~l >>> 0;
    }
  }
  let src = new Uint32Array(N);
  let dst = new Uint32Array(N);
  for (let k = 0; k < N; k++) src[k] = k;
  const counts = new Uint32Array(65536);
  for (let pass = 0; pass < 4; pass++) {
    const word = pass < 2 ? lo : hi;
    const shift = pass % 2 === 0 ? 0 : 16;
    counts.fill(0);
    for (let k = 0; k < N; k++) counts[(word[src[k]!]! >>> shift) & 0xffff]!++;
    let sum = 0;
    for (let d = 0; d < 65536; d++) {
      const c = counts[d]!;
      counts[d] = sum;
      sum += c;
    }
    for (let k = 0; k < N; k++) {
      const id = src[k]!;
      dst[counts[(word[id]! >>> shift) & 0xffff]!++] = id;
    }
    const t = src;
    src = dst;
    dst = t;
  }
  return src;
}

/** The per-item lines of the swap-point search: everything about an item's score except m. */
export interface PriorWeightLines {
  /** Review count of each item, in the observed order (best first). */
  n: Float64Array;
  /** Sum of stars of each item, same order. */
  S: Float64Array;
  /** Prior mean: item k scores (m C + S[k]) / (m + n[k]). */
  C: number;
}

export interface PriorWeightSearchOptions {
  /** List every swap point when the whole range of m holds at most this many crossing pairs. */
  exactPairLimit?: number;
  /** Inside the bracket search, a bracket of m with at most this many crossing pairs is listed. */
  bracketPairLimit?: number;
  /** Called now and then with the share of the search done, 0 to 1. */
  onProgress?: (share: number) => void;
}

export interface PriorWeightStep {
  start: number;
  end: number | null;
  tau: number | null;
}

export interface PriorWeightSearch {
  /** True when every swap point was listed; the steps below are then the whole curve. */
  complete: boolean;
  /** Distinct swap points when complete; otherwise listed ones plus the crossing pairs left unlisted. */
  swapPointCount: number;
  /** Step starts from m = 0 upwards with their tau: every step when complete, else known steps and samples. */
  starts: number[];
  taus: (number | null)[];
  best: PriorWeightStep & { tiedSteps: number };
  /** The step holding m, exactly (a later call may refine the search further). */
  stepAt: (m: number) => PriorWeightStep;
}

const DEFAULT_EXACT_PAIRS = 2_000_000;
const DEFAULT_BRACKET_PAIRS = 250_000;

interface Point {
  m: number;
  /** Items by smoothed score at m, best first; equal scores by observed position. Null once not needed. */
  order: Uint32Array | null;
  /** Concordant minus discordant pairs between the observed ordering and the one at m. */
  f: number;
  /** Pairs of items with equal scores at m. */
  tied: number;
}

interface Bracket {
  lo: Point;
  hi: Point;
  /** Item pairs that swap order for m in (lo.m, hi.m]. */
  s: number;
  /** Once listed: the swap points inside, grouped, and f on the step each one starts. */
  starts: Float64Array | null;
  fs: Float64Array | null;
}

/**
 * Exact swap-point search for the prior weight m (DESIGN §4.8) without visiting every pair.
 *
 * Items i < j (observed order) have score difference sign((m a + b)) with a = C (n_j - n_i) + S_i - S_j,
 * b = S_i n_j - S_j n_i: they swap exactly once, at m* = -b / a, when that is positive. f(m), concordant
 * minus discordant pairs, is therefore a step function that moves by ±2 at each crossing pair.
 *
 * - f at one m is an inversion count: O(N log N) by sorting and a merge sort.
 * - Between two values lo < hi, the pairs that cross are exactly the pairs ordered differently by the
 *   sorted orders at lo and hi (each pair crosses at most once). Their number s is an inversion count of
 *   one order read in the ranks of the other, O(N log N); listing them costs O(N log N + s) (kinetic
 *   sorting: a merge sort that reports each inversion it removes).
 * - Bound: inside (lo, hi] with u upward and d downward crossings, u + d = s and f(hi) - f(lo) = 2(u - d),
 *   so no step exceeds f(lo) + 2u = (f(lo) + f(hi)) / 2 + s.
 * - Search: start from one bracket (m0, mTop] holding every crossing (m0 below the first swap point and
 *   mTop above the last, both found from the adjacent pairs of the limit orders at m -> 0 and m -> inf,
 *   since the first and the last crossing are between neighbours). Repeatedly take the unlisted bracket
 *   with the highest bound; stop when that bound is below the best f seen (F). A bracket with at most
 *   `bracketPairLimit` crossings is listed: its crossings are computed with the same formula, sorted and
 *   grouped as in the all-pairs sweep, and f is carried from f(lo) across each group. A larger one is
 *   split at its geometric midpoint. F only ever holds values of real steps, so at the stop F = max f,
 *   and every step reaching it starts either at m = 0 or inside a listed bracket (a bracket holding part
 *   of such a step has bound >= max f and is never dropped). Hence the best interval (the lowest step
 *   with the maximum), the count of tied steps and their tau are those of the all-pairs sweep.
 * - Step ends and strategy steps are found the same way: the bracket beside a point is split towards it
 *   until it can be listed, so every reported boundary is a listed swap point, computed bitwise as the
 *   all-pairs sweep computes it.
 * Exactness assumes no group of swap points closer than GROUP_TOL straddles a bracket boundary (chosen
 * at geometric midpoints, so this needs a crossing within ~1e-10 of one) and that the float scores order
 * items as their exact values do away from crossings, as the all-pairs sweep also assumes at m0.
 * Memory: O(N) per evaluated point (dropped once both neighbouring brackets are listed) plus O(limit).
 */
export function searchPriorWeight(
  lines: PriorWeightLines,
  options: PriorWeightSearchOptions = {},
): PriorWeightSearch {
  const { n, S, C } = lines;
  const N = n.length;
  const exactLimit = options.exactPairLimit ?? DEFAULT_EXACT_PAIRS;
  const bracketLimit = Math.max(1, options.bracketPairLimit ?? DEFAULT_BRACKET_PAIRS);
  const report = options.onProgress;
  const P = (N * (N - 1)) / 2;

  const scratchA = new Uint32Array(N);
  const scratchB = new Uint32Array(N);
  const scratchC = new Uint32Array(N);
  const scores = new Float64Array(N);

  /** Swap point of items i < j, the all-pairs sweep's formula; NaN when they never swap for m > 0. */
  const rootOf = (i: number, j: number): number => {
    const a = C * (n[j]! - n[i]!) + S[i]! - S[j]!;
    if (a === 0) return Number.NaN;
    const root = (S[j]! * n[i]! - S[i]! * n[j]!) / a;
    return root > 0 && Number.isFinite(root) ? root : Number.NaN;
  };

  /** Inversions of x (values 0..N-1), counted in the scratch buffers. */
  const inversions = (x: Uint32Array): number => {
    scratchB.set(x);
    return mergeInversions(scratchB, scratchC).count;
  };

  /**
   * Items by score at m, best first, equal scores by observed position. The key is the score less C,
   * (S - n C) / (m + n): the same order as the score, but it keeps its precision at large m, where all
   * scores crowd round C.
   */
  const dev = new Float64Array(N);
  for (let k = 0; k < N; k++) dev[k] = S[k]! - n[k]! * C;
  const orderAt = (m: number): Uint32Array => {
    for (let k = 0; k < N; k++) scores[k] = n[k]! + m > 0 ? dev[k]! / (m + n[k]!) : 0;
    return orderByKeyDescending(scores);
  };
  // f and the ties at the first point as kendallParts finds them on the smoothed scores (the all-pairs
  // sweep's start); any later point's f follows from the change in discordant pairs since then.
  let f0 = 0;
  let tied0 = 0;
  let inv0 = 0;
  const evaluate = (m: number): Point => {
    const order = orderAt(m);
    return { m, order, f: f0 + 2 * (inv0 - inversions(order)), tied: tied0 };
  };
  const evaluateFirst = (m: number): Point => {
    for (let k = 0; k < N; k++) scores[k] = n[k]! + m > 0 ? (m * C + S[k]!) / (m + n[k]!) : C;
    const byScore = orderByKeyDescending(scores);
    let run = 1;
    for (let p = 1; p <= N; p++) {
      if (p < N && scores[byScore[p]!] === scores[byScore[p - 1]!]) run++;
      else {
        tied0 += (run * (run - 1)) / 2;
        run = 1;
      }
    }
    // Within a run of equal scores the order is by observed position, so those pairs add no inversion.
    f0 = P - tied0 - 2 * inversions(byScore);
    const order = orderAt(m);
    inv0 = inversions(order);
    return { m, order, f: f0, tied: tied0 };
  };

  /** Pairs ordered differently at two points: inversions of lo's order read in hi's ranks. */
  const between = (lo: Uint32Array, hi: Uint32Array): number => {
    for (let p = 0; p < N; p++) scratchA[hi[p]!] = p;
    const x = new Uint32Array(N);
    for (let p = 0; p < N; p++) x[p] = scratchA[lo[p]!]!;
    return inversions(x);
  };
  /**
   * Lists the pairs ordered differently by two orders (kinetic sorting: the merge sort of `between`,
   * reporting each inversion it removes) as swap points by the all-pairs formula: upward ones (the
   * observed-higher item rises above) from the front of buf, downward ones from the back.
   */
  const listCrossings = (lo: Uint32Array, hi: Uint32Array, buf: Float64Array): [number, number] => {
    for (let p = 0; p < N; p++) scratchA[hi[p]!] = p;
    let a = scratchB;
    let b = scratchC;
    for (let p = 0; p < N; p++) a[p] = scratchA[lo[p]!]!;
    let nUp = 0;
    let nDown = buf.length;
    for (let width = 1; width < N; width *= 2) {
      for (let start = 0; start < N; start += 2 * width) {
        const mid = Math.min(start + width, N);
        const end = Math.min(start + 2 * width, N);
        let i = start;
        let j = mid;
        let k = start;
        while (i < mid && j < end) {
          if (a[j]! < a[i]!) {
            const v = hi[a[j]!]!;
            for (let t = i; t < mid; t++) {
              const u = hi[a[t]!]!;
              const x = u < v ? u : v;
              const y = u < v ? v : u;
              const d = C * (n[y]! - n[x]!) + S[x]! - S[y]!;
              if (d === 0) continue;
              const root = (S[y]! * n[x]! - S[x]! * n[y]!) / d;
              if (!(root > 0) || !Number.isFinite(root)) continue;
              if (d > 0) buf[nUp++] = root;
              else buf[--nDown] = root;
            }
            b[k++] = a[j++]!;
          } else b[k++] = a[i++]!;
        }
        while (i < mid) b[k++] = a[i++]!;
        while (j < end) b[k++] = a[j++]!;
      }
      const t = a;
      a = b;
      b = t;
    }
    return [nUp, nDown];
  };

  /** Limit orders for m -> 0 (by b, then a) and m -> infinity (by a, then b). */
  const limitOrder = (small: boolean): Uint32Array => {
    const order = new Uint32Array(N);
    for (let k = 0; k < N; k++) order[k] = k;
    order.sort((i, j) => {
      const a = C * (n[j]! - n[i]!) + S[i]! - S[j]!;
      const b = S[i]! * n[j]! - S[j]! * n[i]!;
      const sign = small ? Math.sign(b) || Math.sign(a) : Math.sign(a) || Math.sign(b);
      return -sign || i - j;
    });
    return order;
  };
  const adjacentRoots = (order: Uint32Array, pick: (x: number, y: number) => number, from: number) => {
    let best = from;
    for (let p = 0; p + 1 < N; p++) {
      const u = order[p]!;
      const v = order[p + 1]!;
      const r = rootOf(Math.min(u, v), Math.max(u, v));
      if (!Number.isNaN(r)) best = pick(best, r);
    }
    return best;
  };

  const progress = (share: number) => report?.(Math.max(0, Math.min(1, share)));
  progress(0);
  const first = N >= 2 ? adjacentRoots(limitOrder(true), Math.min, Number.POSITIVE_INFINITY) : Infinity;
  const p0 = evaluateFirst(Number.isFinite(first) ? first / 2 : 1);
  // Kendall's tau-b denominator with the ties of the first step, as kendallParts gives it there.
  const denom = Math.sqrt(P * (P - p0.tied));
  const tauOf = (f: number) => (denom > 0 ? Math.max(-1, Math.min(1, f / denom)) : null);

  const br: Bracket[] = [];
  let F = p0.f;
  const list = (k: number) => {
    const b = br[k]!;
    const buf = new Float64Array(b.s);
    const [nUp, nDown] = listCrossings(b.lo.order!, b.hi.order!, buf);
    const ups = buf.subarray(0, nUp).sort();
    const downs = buf.subarray(nDown).sort();
    const nD = downs.length;
    const starts = new Float64Array(nUp + nD);
    const fs = new Float64Array(nUp + nD);
    let groups = 0;
    let f = b.lo.f;
    let iu = 0;
    let id = 0;
    while (iu < nUp || id < nD) {
      const g = iu < nUp && (id >= nD || ups[iu]! <= downs[id]!) ? ups[iu]! : downs[id]!;
      const limit = g * (1 + GROUP_TOL);
      let delta = 0;
      while (iu < nUp && ups[iu]! <= limit) {
        delta++;
        iu++;
      }
      while (id < nD && downs[id]! <= limit) {
        delta--;
        id++;
      }
      f += 2 * delta;
      starts[groups] = g;
      fs[groups++] = f;
      if (f > F) F = f;
    }
    b.starts = starts.slice(0, groups);
    b.fs = fs.slice(0, groups);
    release(k);
  };
  /** Drops the orders no unlisted bracket needs any more. */
  const release = (k: number) => {
    const b = br[k]!;
    if (b.lo !== p0 && (k === 0 || br[k - 1]!.starts !== null)) b.lo.order = null;
    if (k + 1 >= br.length || br[k + 1]!.starts !== null) b.hi.order = null;
  };
  /**
   * True when no pair crosses within CLEAN of p.m. The crossings nearest to m (either side) are between
   * neighbours in the order at m (kinetic sorting), and pairs the float key may misorder cross within
   * its precision of m, so checking the swap points of neighbours suffices. Boundaries are only ever
   * clean points, so no group of swap points straddles one.
   */
  const clean = (p: Point): boolean => {
    const order = p.order!;
    const lo = p.m * (1 - CLEAN);
    const hi = p.m * (1 + CLEAN);
    for (let q = 0; q + 1 < N; q++) {
      const u = order[q]!;
      const v = order[q + 1]!;
      const r = rootOf(Math.min(u, v), Math.max(u, v));
      if (r >= lo && r <= hi) return false;
    }
    return true;
  };
  /** A clean point at m, or null. */
  const cleanAt = (m: number): Point | null => {
    const p = evaluate(m);
    return clean(p) ? p : null;
  };
  /** Splits unlisted bracket k at p, a clean point strictly inside it. */
  const insert = (k: number, p: Point) => {
    const b = br[k]!;
    const s1 = between(b.lo.order!, p.order!);
    // Each pair crosses once, so the crossings of (lo, hi] are those of (lo, p] and of (p, hi].
    const s2 = s1 <= b.s ? b.s - s1 : between(p.order!, b.hi.order!);
    const left: Bracket = { lo: b.lo, hi: p, s: s1, starts: null, fs: null };
    const right: Bracket = { lo: p, hi: b.hi, s: s2, starts: null, fs: null };
    br.splice(k, 1, left, right);
    if (p.f > F) F = p.f;
    if (s1 === 0) list(k);
    if (s2 === 0) list(k + 1);
  };
  /** Splits bracket k near its geometric midpoint (true), or lists it when no clean point is found. */
  const splitMid = (k: number): boolean => {
    const b = br[k]!;
    const a = Math.log(b.lo.m);
    const c = Math.log(b.hi.m);
    for (let t = 0; t < 9; t++) {
      const theta = 0.5 + (t % 2 ? 1 : -1) * 0.04 * Math.ceil(t / 2);
      const m = t === 0 ? Math.sqrt(b.lo.m * b.hi.m) : Math.exp(a + theta * (c - a));
      if (!(m > b.lo.m && m < b.hi.m)) continue;
      const p = cleanAt(m);
      if (p) {
        insert(k, p);
        return true;
      }
    }
    list(k);
    return false;
  };
  /**
   * Makes m (inside unlisted bracket k) a boundary when it is clean; otherwise lists a narrow bracket
   * around it, so the groups of swap points at m are found whole.
   */
  const isolate = (k: number, m: number) => {
    const p = cleanAt(m);
    if (p) return insert(k, p);
    for (let w = 1e-8; w <= 1e-3; w *= 10) {
      const b = br[k]!;
      if (m * (1 - w) <= b.lo.m || m * (1 + w) >= b.hi.m) break;
      const left = cleanAt(m * (1 - w));
      if (!left) continue;
      const right = cleanAt(m * (1 + w));
      if (!right) continue;
      insert(k, left);
      insert(k + 1, right);
      if (br[k + 1]!.starts === null) list(k + 1);
      return;
    }
    list(k);
  };
  const small = (b: Bracket) => b.s <= bracketLimit || b.hi.m <= b.lo.m * (1 + NARROW);
  const bound = (b: Bracket) => (b.lo.f + b.hi.f) / 2 + b.s;

  if (Number.isFinite(first)) {
    const last = adjacentRoots(limitOrder(false), Math.max, first);
    const top = evaluate(2 * last);
    if (top.f > F) F = top.f;
    br.push({ lo: p0, hi: top, s: between(p0.order!, top.order!), starts: null, fs: null });
    const total = br[0]!.s;
    if (total <= exactLimit) list(0);
    let done = 0;
    for (;;) {
      let k = -1;
      let highest = Number.NEGATIVE_INFINITY;
      let pending = 0;
      for (let i = 0; i < br.length; i++) {
        const b = br[i]!;
        if (b.starts !== null) continue;
        const u = bound(b);
        if (u >= F) pending += b.s;
        if (u > highest) {
          highest = u;
          k = i;
        }
      }
      done = Math.max(done, total > 0 ? 1 - pending / total : 1);
      progress(0.95 * done);
      if (k < 0 || highest < F) break;
      const b = br[k]!;
      if (small(b)) list(k);
      else splitMid(k);
    }
  }

  /** First listed swap point in bracket k or above, refining unlisted brackets from their low end. */
  const firstStartFrom = (k: number): number | null => {
    for (let i = k; i < br.length;) {
      const b = br[i]!;
      if (b.starts === null) {
        if (small(b)) list(i);
        else splitMid(i);
        continue;
      }
      if (b.starts.length > 0) return b.starts[0]!;
      i++;
    }
    return null;
  };
  /** Last swap point in bracket k or below (0: none, the first step), refining from their high end. */
  const lastStartUpTo = (k: number): number => {
    for (let i = k; i >= 0;) {
      const b = br[i]!;
      if (b.starts === null) {
        if (small(b)) list(i);
        else if (splitMid(i)) i++;
        continue;
      }
      if (b.starts.length > 0) return b.starts[b.starts.length - 1]!;
      i--;
    }
    return 0;
  };

  const stepAt = (m: number): PriorWeightStep => {
    if (br.length === 0 || m <= p0.m) return { start: 0, end: firstStartFrom(0), tau: tauOf(p0.f) };
    let k = br.findIndex((b) => m <= b.hi.m);
    if (k < 0) {
      const end = br[br.length - 1]!.hi;
      return { start: lastStartUpTo(br.length - 1), end: null, tau: tauOf(end.f) };
    }
    if (br[k]!.starts === null && m < br[k]!.hi.m) isolate(k, m);
    k = br.findIndex((b) => m <= b.hi.m);
    const b = br[k]!;
    // Ends first: refining above k leaves the brackets up to k where they are.
    if (b.starts === null) {
      const end = firstStartFrom(k + 1);
      return { start: lastStartUpTo(k), end, tau: tauOf(b.hi.f) };
    }
    let idx = -1;
    for (let lo = 0, hi = b.starts.length - 1; lo <= hi;) {
      const mid = (lo + hi) >> 1;
      if (b.starts[mid]! <= m) {
        idx = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    if (idx < 0) {
      const end = b.starts.length > 0 ? b.starts[0]! : firstStartFrom(k + 1);
      return { start: lastStartUpTo(k - 1), end, tau: tauOf(b.lo.f) };
    }
    const end = idx + 1 < b.starts.length ? b.starts[idx + 1]! : firstStartFrom(k + 1);
    return { start: b.starts[idx]!, end, tau: tauOf(b.fs![idx]!) };
  };

  // The lowest step reaching F, and how many others reach it (none counted when tau is undefined).
  let bestStart = 0;
  let bestEnd: number | null = null;
  let bestFound = p0.f === F;
  let reaching = bestFound ? 1 : 0;
  if (bestFound) bestEnd = firstStartFrom(0);
  for (let k = 0; k < br.length; k++) {
    const b = br[k]!;
    if (b.fs === null) continue;
    for (let g = 0; g < b.fs.length; g++) {
      if (b.fs[g] !== F) continue;
      reaching++;
      if (!bestFound) {
        bestFound = true;
        bestStart = b.starts![g]!;
        bestEnd = g + 1 < b.fs.length ? b.starts![g + 1]! : Number.NaN;
        if (Number.isNaN(bestEnd)) bestEnd = firstStartFrom(k + 1);
      }
    }
  }
  const best =
    denom > 0
      ? { start: bestStart, end: bestEnd, tau: tauOf(F), tiedSteps: reaching - 1 }
      : { start: 0, end: firstStartFrom(0), tau: null, tiedSteps: 0 };

  // Snapshot of the steps known now (stepAt may list more later; they do not change these).
  const complete = br.every((b) => b.starts !== null);
  const starts: number[] = [0];
  const fAt: number[] = [p0.f];
  let swapPointCount = 0;
  for (const b of br) {
    if (b.starts !== null) {
      swapPointCount += b.starts.length;
      for (let g = 0; g < b.starts.length; g++) {
        starts.push(b.starts[g]!);
        fAt.push(b.fs![g]!);
      }
    } else {
      swapPointCount += b.s;
      starts.push(b.hi.m);
      fAt.push(b.hi.f);
    }
  }
  progress(1);
  return { complete, swapPointCount, starts, taus: fAt.map(tauOf), best, stepAt };
}

/**
 * Fits the prior weight m to an observed ordering (best first) by Kendall's tau-b over every step of m,
 * with the exact swap-point search of searchPriorWeight.
 */
export function calibrate(
  items: readonly ItemInput[],
  observed: readonly string[],
  settings: Partial<ScoringSettings> = {},
  options: CalibrationOptions,
): CalibrationResult {
  const s = resolveSettings(settings);
  const cols = toColumns(items, options.asOf, s);
  const moments = categoryMoments(cols);
  const C = priorMean(moments, s, []);
  const maxCurvePoints = Math.max(2, options.maxCurvePoints ?? 2000);
  const unexplainedCount = options.unexplainedCount ?? 10;

  const indexOf = new Map<string, number>();
  for (let i = 0; i < cols.size; i++) indexOf.set(cols.skus[i]!, i);
  const unmatched: string[] = [];
  const picked: number[] = [];
  const seen = new Set<string>();
  for (const sku of observed) {
    if (seen.has(sku)) continue;
    seen.add(sku);
    const i = indexOf.get(sku);
    if (i === undefined) unmatched.push(sku);
    else picked.push(i);
  }
  const N = picked.length;
  const n = new Float64Array(N);
  const S = new Float64Array(N);
  const skus: string[] = new Array<string>(N);
  for (let k = 0; k < N; k++) {
    n[k] = cols.n[picked[k]!]!;
    S[k] = cols.sumStars[picked[k]!]!;
    skus[k] = cols.skus[picked[k]!]!;
  }
  // Position k in the observed list is item k here: i < j means i is observed above j.
  const search = searchPriorWeight({ n, S, C }, { ...options.search, onProgress: options.onProgress });

  const strategies: StrategyOnCurve[] = [];
  for (const strategy of priorWeightStrategies) {
    if (strategy === 'fixed' && s.priorWeightValue === null) continue;
    const m = priorWeightFor(strategy, moments, s.priorWeightValue);
    if (m === null) {
      strategies.push({ strategy, m: null, tau: null, start: null, end: null });
      continue;
    }
    const step = search.stepAt(m);
    strategies.push({ strategy, m, tau: step.tau, start: step.start, end: step.end });
  }

  const { starts, taus } = search;
  const K = starts.length;
  const endOf = (k: number) => (k + 1 < K ? starts[k + 1]! : null);
  let curve: CurveStep[];
  const curveExact = search.complete && K <= maxCurvePoints;
  if (curveExact) curve = starts.map((start, k) => ({ start, end: endOf(k), tau: taus[k] ?? null }));
  else {
    curve = [];
    const width = Math.ceil(K / maxCurvePoints);
    for (let k0 = 0; k0 < K; k0 += width) {
      const k1 = Math.min(K, k0 + width) - 1;
      let t: number | null = null;
      for (let k = k0; k <= k1; k++) {
        const tk = taus[k] ?? null;
        if (tk !== null && (t === null || tk > t)) t = tk;
      }
      curve.push({ start: starts[k0]!, end: endOf(k1), tau: t });
    }
  }

  const { start, end, tau, tiedSteps } = search.best;
  const best = { start, end, tau, point: representative(start, end), tiedSteps };
  const unexplained: UnexplainedItem[] = [];
  if (N >= 2) {
    const scores = new Float64Array(N);
    const m = best.point;
    for (let k = 0; k < N; k++) scores[k] = n[k]! + m > 0 ? (m * C + S[k]!) / (m + n[k]!) : C;
    const fitted = orderByScore(scores, n, skus);
    for (let p = 0; p < N; p++) {
      const k = fitted[p]!;
      const gap = k - p;
      if (gap !== 0) unexplained.push({ sku: skus[k]!, observedPosition: k + 1, fittedPosition: p + 1, gap });
    }
    unexplained.sort((a, b) => Math.abs(b.gap) - Math.abs(a.gap) || (a.sku < b.sku ? -1 : 1));
    unexplained.length = Math.min(unexplained.length, unexplainedCount);
  }

  return {
    C,
    matchedCount: N,
    unmatched,
    swapPointCount: search.swapPointCount,
    curve,
    curveExact,
    best,
    strategies,
    unexplained,
  };
}
