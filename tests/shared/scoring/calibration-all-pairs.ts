import { categoryMoments, priorMean, priorWeightFor } from '../../../shared/scoring/prior';
import { kendallParts, orderByScore } from '../../../shared/scoring/rank-stats';
import { priorWeightStrategies, resolveSettings } from '../../../shared/scoring/settings';
import type { ScoringSettings } from '../../../shared/scoring/settings';
import { toColumns } from '../../../shared/scoring/summary';
import type { ItemInput } from '../../../shared/scoring/types';
import type {
  CalibrationOptions,
  CalibrationResult,
  CurveStep,
  StrategyOnCurve,
  UnexplainedItem,
} from '../../../shared/scoring/calibration';

/**
 * Test oracle: the all-pairs calibration Ballast shipped before the bracket search (O(P log P) time and
 * O(P) memory for P item pairs), kept verbatim so the fast search can be compared with it.
 */
/** Swap points closer than this (relative) are one crossing of several lines through a common point. */
const GROUP_TOL = 1e-10;

function representative(start: number, end: number | null): number {
  if (end === null) return start > 0 ? 2 * start : 1;
  if (start === 0) return end / 2;
  return Math.sqrt(start * end);
}

/**
 * Fits the prior weight m to an observed ordering (best first) by Kendall's tau-b.
 * Items i, j swap at exactly one m* = (S_j n_i - S_i n_j) / (C (n_j - n_i) + S_i - S_j), so tau-b is a
 * step function of m: one O(N log N) evaluation in the first step, then each sorted swap point
 * changes the concordant-minus-discordant count by 2. Cost O(P log P) for P item pairs.
 */
export function calibrateAllPairs(
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
  const maxPairs = (N * (N - 1)) / 2;
  const up = new Float64Array(maxPairs);
  const down = new Float64Array(maxPairs);
  let nUp = 0;
  let nDown = 0;
  let first = Number.POSITIVE_INFINITY;
  for (let i = 0; i < N; i++) {
    const ni = n[i]!;
    const Si = S[i]!;
    for (let j = i + 1; j < N; j++) {
      const a = C * (n[j]! - ni) + Si - S[j]!;
      if (a === 0) continue;
      const root = (S[j]! * ni - Si * n[j]!) / a;
      if (!(root > 0) || !Number.isFinite(root)) continue;
      if (root < first) first = root;
      // Above the root s_i - s_j has the sign of a; the observed says i above j.
      if (a > 0) up[nUp++] = root;
      else down[nDown++] = root;
    }
  }
  const ups = up.subarray(0, nUp).sort();
  const downs = down.subarray(0, nDown).sort();

  const scoresAt = (m: number) => {
    const out = new Float64Array(N);
    for (let k = 0; k < N; k++) out[k] = n[k]! + m > 0 ? (m * C + S[k]!) / (m + n[k]!) : C;
    return out;
  };
  const observedScore = new Float64Array(N);
  for (let k = 0; k < N; k++) observedScore[k] = N - k;

  const starts: number[] = [0];
  const taus: (number | null)[] = [];
  let swapPointCount = 0;
  if (N >= 2) {
    const m0 = Number.isFinite(first) ? first / 2 : 1;
    const parts = kendallParts(observedScore, scoresAt(m0));
    const denom = Math.sqrt((parts.pairs - parts.tiedX) * (parts.pairs - parts.tiedY));
    let num = parts.numerator;
    const tauOf = (x: number) => (denom > 0 ? Math.max(-1, Math.min(1, x / denom)) : null);
    let iu = 0;
    let id = 0;
    while (iu < nUp || id < nDown) {
      const g = iu < nUp && (id >= nDown || ups[iu]! <= downs[id]!) ? ups[iu]! : downs[id]!;
      const limit = g * (1 + GROUP_TOL);
      let delta = 0;
      while (iu < nUp && ups[iu]! <= limit) {
        delta++;
        iu++;
      }
      while (id < nDown && downs[id]! <= limit) {
        delta--;
        id++;
      }
      taus.push(tauOf(num));
      starts.push(g);
      swapPointCount++;
      num += 2 * delta;
    }
    taus.push(tauOf(num));
  } else taus.push(null);

  const K = starts.length;
  const endOf = (k: number) => (k + 1 < K ? starts[k + 1]! : null);
  let bestK = 0;
  for (let k = 1; k < K; k++) if ((taus[k] ?? -2) > (taus[bestK] ?? -2) + 1e-12) bestK = k;
  const bestTau = taus[bestK] ?? null;
  let tiedSteps = 0;
  for (let k = 0; k < K; k++)
    if (k !== bestK && bestTau !== null && Math.abs((taus[k] ?? -2) - bestTau) <= 1e-12) tiedSteps++;
  const best = {
    start: starts[bestK]!,
    end: endOf(bestK),
    tau: bestTau,
    point: representative(starts[bestK]!, endOf(bestK)),
    tiedSteps,
  };

  const stepAt = (m: number) => {
    let lo = 0;
    let hi = K - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (starts[mid]! <= m) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  };
  const strategies: StrategyOnCurve[] = [];
  for (const strategy of priorWeightStrategies) {
    if (strategy === 'fixed' && s.priorWeightValue === null) continue;
    const m = priorWeightFor(strategy, moments, s.priorWeightValue);
    if (m === null) {
      strategies.push({ strategy, m: null, tau: null, start: null, end: null });
      continue;
    }
    const k = stepAt(m);
    strategies.push({ strategy, m, tau: taus[k] ?? null, start: starts[k]!, end: endOf(k) });
  }

  let curve: CurveStep[];
  const curveExact = K <= maxCurvePoints;
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

  const unexplained: UnexplainedItem[] = [];
  if (N >= 2) {
    const fitted = orderByScore(scoresAt(best.point), n, skus);
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
    swapPointCount,
    curve,
    curveExact,
    best,
    strategies,
    unexplained,
  };
}
