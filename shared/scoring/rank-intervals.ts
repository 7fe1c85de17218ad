import { sameScore } from './rank-stats';
import { itemSpread, posteriorVariance, scoreCategory } from './score-category';
import type { ScoreOptions } from './score-category';
import type { ScoringSettings } from './settings';
import { toColumns } from './summary';
import type { EvidenceColumns } from './summary';
import type { ItemInput, ResolvedParameters, ScoreResult } from './types';

/**
 * How sure each smoothed rank is (Goldstein & Spiegelhalter 1996, "League tables and their limitations",
 * JRSS A 159; Marshall & Spiegelhalter 1998, BMJ 316): draw every item's true mean star from its
 * posterior, rank each draw with the point ranks' tie rule, and read each item's rank distribution.
 *
 * Posterior per item, the model of the lower bound (DESIGN 4.3):
 * - with a star histogram and category star shares p_k whose mean is the prior mean C: the mean star of a
 *   Dirichlet(a_k = m*p_k + n_k) over the five levels, drawn as sum k*G_k / sum G_k with G_k ~ Gamma(a_k);
 * - known by mean and count only (or where p_k does not average to C, e.g. a fixed prior mean): a Beta on
 *   [1, 5] with the posterior mean (the smoothed score) and posterior variance of the lower bound,
 *   drawn as 1 + 4*Ga/(Ga + Gb). The Beta is the exact law of the Dirichlet's mean when only two star
 *   levels carry weight (the aggregation property of the Dirichlet), it stays on the rating scale where a
 *   normal would not, and it matches the two moments the lower bound already rests on.
 * - no prior weight and no evidence: the point C.
 * Gamma draws: Marsaglia & Tsang 2000, "A simple method for generating gamma variables", ACM TOMS 26(3),
 * with their boost Gamma(a) = Gamma(a + 1) * U^(1/a) for a < 1; normals by Box–Muller; uniforms from
 * mulberry32 seeded by the caller, so a seed and S reproduce every figure exactly.
 *
 * Memory kept: never the S x N matrix of draws. Per item one rank histogram in log-linear bins
 * (HdrHistogram's layout, Tene 2012): ranks 1..2H each have their own bin, beyond that bins are at most
 * 1/H of the rank wide, so N x B 16-bit counters (S at most 65,535) with B = H*(floor(log2 N) - log2 H + 2); H is 64
 * unless that would pass 64 MiB (20,000 items: 640 bins, 25.6 MB). Plus O(N) typed arrays for one draw.
 * Quantiles in a wide bin are widened to its edges, so a reported interval is never narrower than the
 * sampled one.
 */

export interface RankIntervalOptions {
  /** Monte Carlo draws S. */
  draws?: number;
  /** Seed of the uniform stream (a 32-bit whole number). */
  seed?: number;
  /** Central probability of the rank interval; 0.9 is the 5th to the 95th percentile. */
  level?: number;
  /** "Top k" of the top-k probability. */
  topK?: number;
}

export const defaultRankIntervalOptions = Object.freeze({
  draws: 2000,
  seed: 20_261_203,
  level: 0.9,
  topK: 10,
});

export interface RankIntervalResult {
  draws: number;
  seed: number;
  level: number;
  topK: number;
  /** Per item, in input order. */
  medianRank: Uint32Array;
  lowerRank: Uint32Array;
  upperRank: Uint32Array;
  /** Share of draws with rank <= topK. */
  topShare: Float64Array;
  /**
   * Share of draws in which the item listed just above (smoothed listing order) has the higher mean
   * star; NaN for the first listed item. Exact ties count one half.
   */
  aboveAheadShare: Float64Array;
  /** Bytes of the counters kept (histograms and per-item tallies). */
  bytesKept: number;
  /** Ranks up to this are exact in the histograms; beyond, bins are at most 1/binsPerOctave wide. */
  exactUpTo: number;
}

/** Gamma slots of every item's draw: mean star = sum w*G / sum G. */
export interface PosteriorPlan {
  size: number;
  /** slotStart[i]..slotStart[i+1] are item i's slots; none: the item is the point fixedValue[i]. */
  slotStart: Uint32Array;
  /** Marsaglia–Tsang constants of Gamma(a) (of a + 1 when a < 1). */
  d: Float64Array;
  c: Float64Array;
  /** 1/a when a < 1 (boost), else 0. */
  boost: Float64Array;
  /** Star value the slot stands for. */
  weight: Float64Array;
  fixedValue: Float64Array;
  /** Per item: 'dirichlet' 0, 'beta' 1, 'point' 2. */
  kind: Uint8Array;
}

export const posteriorKinds = ['dirichlet', 'beta', 'point'] as const;

function pushSlot(shape: number, weight: number, out: number[][]): void {
  if (!(shape > 0)) return;
  const a = shape < 1 ? shape + 1 : shape;
  const d = a - 1 / 3;
  out.push([d, 1 / Math.sqrt(9 * d), shape < 1 ? 1 / shape : 0, weight]);
}

/** The posterior of every item's mean star, as gamma slots; `smooth` is the smoothed score per item. */
export function posteriorPlan(
  cols: EvidenceColumns,
  resolved: Pick<ResolvedParameters, 'm' | 'C' | 'starShares' | 'priorVariance' | 'pooledWithinVariance'>,
): PosteriorPlan {
  const { size, n, sumStars, histogram, hasHistogram } = cols;
  const { m, C, starShares, priorVariance, pooledWithinVariance } = resolved;
  let sharesMean = 0;
  if (starShares) for (let k = 0; k < 5; k++) sharesMean += (k + 1) * starShares[k]!;
  const sharesFit = starShares !== null && Math.abs(sharesMean - C) <= 1e-9 * C;
  const slots: number[][] = [];
  const slotStart = new Uint32Array(size + 1);
  const fixedValue = new Float64Array(size);
  const kind = new Uint8Array(size);
  for (let i = 0; i < size; i++) {
    slotStart[i] = slots.length;
    const ni = n[i]!;
    const a0 = m + ni;
    const smoothed = a0 > 0 ? (m * C + sumStars[i]!) / a0 : C;
    fixedValue[i] = smoothed;
    if (!(a0 > 0)) {
      kind[i] = 2;
      continue;
    }
    if (hasHistogram[i] && (sharesFit || m === 0)) {
      for (let k = 0; k < 5; k++)
        pushSlot(m * (starShares ? starShares[k]! : 0) + histogram[i * 5 + k]!, k + 1, slots);
      kind[i] = 0;
      continue;
    }
    const raw = ni > 0 ? sumStars[i]! / ni : Number.NaN;
    const { itemVar } = itemSpread(cols, i, raw, pooledWithinVariance);
    const v = posteriorVariance(m, C, priorVariance, ni, raw, itemVar, smoothed) / 16;
    const u = (smoothed - 1) / 4;
    const room = u * (1 - u);
    if (!(v > 0) || !(room > 0)) {
      kind[i] = 2;
      continue;
    }
    // Beta(a, b) with mean u and variance min(v, room): a + b = u(1 - u)/v - 1 >= a0 by Bhatia–Davis.
    const total = Math.max(room / Math.min(v, room) - 1, 1e-9);
    pushSlot(u * total, 5, slots);
    pushSlot((1 - u) * total, 1, slots);
    kind[i] = 1;
  }
  slotStart[size] = slots.length;
  const d = new Float64Array(slots.length);
  const c = new Float64Array(slots.length);
  const boost = new Float64Array(slots.length);
  const weight = new Float64Array(slots.length);
  for (let s = 0; s < slots.length; s++) {
    const slot = slots[s]!;
    d[s] = slot[0]!;
    c[s] = slot[1]!;
    boost[s] = slot[2]!;
    weight[s] = slot[3]!;
  }
  return { size, slotStart, d, c, boost, weight, fixedValue, kind };
}

/** Draws one mean star per item into `out`, consuming uniforms from `uniform`. */
export type MeanDrawer = (out: Float64Array) => void;

/**
 * Marsaglia & Tsang gamma draws over the plan's slots, from one seeded uniform stream. mulberry32
 * (shared/scoring/random.ts) is written out inline here: the same stream, without a call per uniform.
 */
export function meanDrawer(plan: PosteriorPlan, seed: number): MeanDrawer {
  let state = seed >>> 0;
  let spare = 0;
  let hasSpare = false;
  const { slotStart, d, c, boost, weight, fixedValue, size } = plan;
  return (out) => {
    for (let i = 0; i < size; i++) {
      const from = slotStart[i]!;
      const to = slotStart[i + 1]!;
      let num = 0;
      let den = 0;
      for (let s = from; s < to; s++) {
        const ds = d[s]!;
        const cs = c[s]!;
        let g: number;
        for (;;) {
          let x: number;
          if (hasSpare) {
            hasSpare = false;
            x = spare;
          } else {
            // Box–Muller on two uniforms; 1 - U keeps the logarithm finite.
            state = (state + 0x6d2b79f5) >>> 0;
            let t = Math.imul(state ^ (state >>> 15), state | 1);
            t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
            const u1 = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
            state = (state + 0x6d2b79f5) >>> 0;
            t = Math.imul(state ^ (state >>> 15), state | 1);
            t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
            const u2 = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
            const rad = Math.sqrt(-2 * Math.log(1 - u1));
            const ang = 2 * Math.PI * u2;
            spare = rad * Math.sin(ang);
            hasSpare = true;
            x = rad * Math.cos(ang);
          }
          let v = 1 + cs * x;
          if (v <= 0) continue;
          v = v * v * v;
          state = (state + 0x6d2b79f5) >>> 0;
          let t = Math.imul(state ^ (state >>> 15), state | 1);
          t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
          const u = ((t ^ (t >>> 14)) >>> 0) / 4294967296;
          const x2 = x * x;
          if (u < 1 - 0.0331 * x2 * x2 || Math.log(u) < 0.5 * x2 + ds * (1 - v + Math.log(v))) {
            g = ds * v;
            break;
          }
        }
        const b = boost[s]!;
        if (b > 0) {
          state = (state + 0x6d2b79f5) >>> 0;
          let t = Math.imul(state ^ (state >>> 15), state | 1);
          t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
          g *= Math.pow(1 - ((t ^ (t >>> 14)) >>> 0) / 4294967296, b);
        }
        num += weight[s]! * g;
        den += g;
      }
      out[i] = den > 0 ? num / den : fixedValue[i]!;
    }
  };
}

const littleEndian = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * Ranks one draw: competition ranks (1, 2, 2, 4) with sameScore ties, as the point ranks. The listing is
 * a native sort of the values with the item's index written into their lowest ceil(log2 N) mantissa bits;
 * two draws closer than 2^(bits - 52) of their value may come out in either order, far below the Monte
 * Carlo error. `keys` must have room for N doubles.
 */
export function rankDraw(values: Float64Array, keys: Float64Array, ranks: Uint32Array): void {
  const size = values.length;
  const bits = Math.max(1, Math.ceil(Math.log2(Math.max(2, size))));
  const mask = bits >= 32 ? 0xffffffff : (1 << bits) - 1;
  const words = new Uint32Array(keys.buffer, keys.byteOffset, size * 2);
  const lo = littleEndian ? 0 : 1;
  for (let i = 0; i < size; i++) {
    keys[i] = values[i]!;
    const w = 2 * i + lo;
    words[w] = ((words[w]! & ~mask) | i) >>> 0;
  }
  keys.sort();
  let prevValue = Number.NaN;
  let prevRank = 0;
  for (let j = size - 1, p = 1; j >= 0; j--, p++) {
    const idx = words[2 * j + lo]! & mask;
    const v = values[idx]!;
    const rank = p > 1 && sameScore(v, prevValue) ? prevRank : p;
    ranks[idx] = rank;
    prevValue = v;
    prevRank = rank;
  }
}

function binLayout(size: number, countBytes: number): { octave: number; log2H: number; bins: number } {
  for (let log2H = 6; ; log2H--) {
    const H = 1 << log2H;
    const top = Math.max(0, size - 1);
    const bins = top < 2 * H ? Math.max(1, size) : H * (31 - Math.clz32(top) - log2H + 2);
    if (log2H === 2 || size * bins * countBytes <= 64 * 1024 * 1024) return { octave: H, log2H, bins };
  }
}

export function binOf(rank: number, H: number, log2H: number): number {
  const x = rank - 1;
  if (x < 2 * H) return x;
  const shift = 31 - Math.clz32(x) - log2H;
  return H * (shift + 1) + (x >>> shift) - H;
}

/** First and last rank of a bin (exported for the tests). */
export function binEdges(bin: number, H: number): [number, number] {
  if (bin < 2 * H) return [bin + 1, bin + 1];
  const shift = Math.floor(bin / H) - 1;
  const first = (bin - H * (shift + 1) + H) * 2 ** shift;
  return [first + 1, first + 2 ** shift];
}

function checkOptions(options: RankIntervalOptions): Required<RankIntervalOptions> {
  const o = { ...defaultRankIntervalOptions, ...options };
  // 16-bit counters: at most 65,535 draws.
  if (!Number.isInteger(o.draws) || o.draws < 10 || o.draws > 0xffff)
    throw new RangeError('draws must be a whole number from 10 to 65,535');
  if (!Number.isInteger(o.seed) || o.seed < 0 || o.seed > 0xffffffff)
    throw new RangeError('seed must be a whole number from 0 to 4294967295');
  if (!(o.level > 0 && o.level < 1)) throw new RangeError('level must be between 0 and 1');
  if (!Number.isInteger(o.topK) || o.topK < 1)
    throw new RangeError('topK must be a whole number of 1 or more');
  return o;
}

/**
 * Samples the rank distribution of every item. `listing` is the smoothed listing order (item indices,
 * best first), used for the "item above is truly ahead" share.
 */
export function sampleRankIntervals(
  plan: PosteriorPlan,
  listing: Uint32Array,
  options: RankIntervalOptions = {},
): RankIntervalResult {
  const o = checkOptions(options);
  const size = plan.size;
  const S = o.draws;
  const { octave: H, log2H, bins } = binLayout(size, 2);
  const hist = new Uint16Array(size * bins);
  const top = new Uint32Array(size);
  const ahead = new Float64Array(size);
  const above = new Int32Array(size).fill(-1);
  for (let p = 1; p < listing.length; p++) above[listing[p]!] = listing[p - 1]!;

  const values = new Float64Array(size);
  const keys = new Float64Array(size);
  const ranks = new Uint32Array(size);
  const draw = meanDrawer(plan, o.seed);
  const K = o.topK;
  for (let s = 0; s < S; s++) {
    draw(values);
    rankDraw(values, keys, ranks);
    for (let i = 0; i < size; i++) {
      const r = ranks[i]!;
      hist[i * bins + binOf(r, H, log2H)]!++;
      if (r <= K) top[i]!++;
      const a = above[i]!;
      if (a >= 0) {
        const va = values[a]!;
        const vi = values[i]!;
        if (sameScore(va, vi)) ahead[i]! += 0.5;
        else if (va > vi) ahead[i]! += 1;
      }
    }
  }

  const lowerRank = new Uint32Array(size);
  const medianRank = new Uint32Array(size);
  const upperRank = new Uint32Array(size);
  const topShare = new Float64Array(size);
  const aboveAheadShare = new Float64Array(size);
  // Nearest-rank percentiles: the ceil(q*S)-th smallest rank of the S draws.
  const tail = (1 - o.level) / 2;
  const atLower = Math.max(1, Math.ceil(tail * S - 1e-9));
  const atMedian = Math.max(1, Math.ceil(0.5 * S - 1e-9));
  const atUpper = Math.max(1, Math.ceil((1 - tail) * S - 1e-9));
  for (let i = 0; i < size; i++) {
    let cum = 0;
    let gotLower = false;
    let gotMedian = false;
    const base = i * bins;
    for (let b = 0; b < bins; b++) {
      const count = hist[base + b]!;
      if (count === 0) continue;
      cum += count;
      const [first, last] = binEdges(b, H);
      if (!gotLower && cum >= atLower) {
        lowerRank[i] = first;
        gotLower = true;
      }
      if (!gotMedian && cum >= atMedian) {
        medianRank[i] = Math.min(size, Math.round((first + last) / 2));
        gotMedian = true;
      }
      if (cum >= atUpper) {
        upperRank[i] = Math.min(size, last);
        break;
      }
    }
    topShare[i] = top[i]! / S;
    aboveAheadShare[i] = above[i]! >= 0 ? ahead[i]! / S : Number.NaN;
  }
  return {
    draws: S,
    seed: o.seed,
    level: o.level,
    topK: K,
    medianRank,
    lowerRank,
    upperRank,
    topShare,
    aboveAheadShare,
    bytesKept: hist.byteLength + top.byteLength + ahead.byteLength + above.byteLength,
    exactUpTo: Math.min(size, 2 * H),
  };
}

/** The smoothed listing order of a scored category: item indices, best first. */
export function smoothedListing(result: ScoreResult): Uint32Array {
  const listing = new Uint32Array(result.items.length);
  result.items.forEach((item, i) => {
    listing[item.smoothedPosition - 1] = i;
  });
  return listing;
}

/** Scores a category and samples its rank intervals from the same evidence and resolved prior. */
export function scoreWithRankIntervals(
  items: readonly ItemInput[],
  settings: Partial<ScoringSettings>,
  options: ScoreOptions,
  rankOptions: RankIntervalOptions = {},
): { result: ScoreResult; intervals: RankIntervalResult } {
  const result = scoreCategory(items, settings, options);
  const cols = toColumns(items, options.asOf, result.resolved);
  const plan = posteriorPlan(cols, result.resolved);
  return { result, intervals: sampleRankIntervals(plan, smoothedListing(result), rankOptions) };
}
