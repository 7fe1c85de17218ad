import { performance } from 'node:perf_hooks';
import { calibrate } from '../../shared/scoring/calibration';
import { scoreCategory } from '../../shared/scoring/score-category';
import type { CountMeanInput, HistogramInput } from '../../shared/scoring/types';

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function syntheticCategory(size: number, seed: number) {
  const rand = mulberry32(seed);
  const counts = new Float64Array(size);
  const sums = new Float64Array(size);
  const items: CountMeanInput[] = new Array<CountMeanInput>(size);
  for (let i = 0; i < size; i++) {
    const count = Math.floor(Math.exp(rand() * 7));
    const quality = 3 + 2 * rand();
    let sum = 0;
    for (let k = 0; k < Math.min(count, 5); k++)
      sum += Math.min(5, Math.max(1, Math.round(quality + rand() - 0.5)));
    const mean = count === 0 ? null : Math.min(5, Math.max(1, count <= 5 ? sum / count : quality));
    counts[i] = count;
    sums[i] = mean === null ? 0 : mean * count;
    items[i] = { sku: `SKU-${String(i).padStart(6, '0')}`, count, mean };
  }
  return { counts, sums, items };
}

function syntheticHistograms(size: number, seed: number): { items: HistogramInput[]; observed: string[] } {
  const rand = mulberry32(seed);
  const items: HistogramInput[] = [];
  for (let i = 0; i < size; i++) {
    const n = 1 + Math.floor(Math.exp(rand() * 6));
    const h: [number, number, number, number, number] = [0, 0, 0, 0, 0];
    const tilt = rand();
    for (let r = 0; r < n; r++) {
      const u = rand();
      h[u < tilt * 0.2 ? 0 : u < tilt * 0.3 ? 1 : u < 0.45 ? 2 : u < 0.7 ? 3 : 4]++;
    }
    items.push({ sku: `CAL-${i}`, histogram: h });
  }
  const scored = scoreCategory(
    items,
    { priorWeightStrategy: 'fixed', priorWeightValue: 25 },
    { asOf: '2025-01-01' },
  );
  // A noisy observed ordering: the fixed-m smoothed score plus a little jitter.
  const observed = scored.items
    .map((it) => ({ sku: it.sku, key: it.smoothed + (rand() - 0.5) * 0.05 }))
    .sort((a, b) => b.key - a.key)
    .map((x) => x.sku);
  return { items, observed };
}

function medianTime(runs: number, fn: () => void): number {
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return times[times.length >> 1]!;
}

export async function run(): Promise<void> {
  const size = 100_000;
  const { counts, sums, items } = syntheticCategory(size, 20250101);
  const raw = new Float64Array(size);
  let sink = 0;
  const bareLoop = () => {
    for (let i = 0; i < size; i++) raw[i] = counts[i]! > 0 ? sums[i]! / counts[i]! : Number.NaN;
    sink += raw[size - 1]!;
  };
  const bareLoopObjects = () => {
    for (let i = 0; i < size; i++) {
      const it = items[i]!;
      raw[i] = it.count > 0 ? (it.count * (it.mean ?? 0)) / it.count : Number.NaN;
    }
    sink += raw[0]!;
  };
  const full = () => {
    const r = scoreCategory(items, {}, { asOf: '2025-01-01' });
    sink += r.category.meanAbsDrift;
  };
  for (let w = 0; w < 3; w++) {
    bareLoop();
    bareLoopObjects();
    full();
  }
  const tBare = medianTime(21, bareLoop);
  const tBareObjects = medianTime(21, bareLoopObjects);
  const tFull = medianTime(7, full);
  console.log(`scoring: ${size} items (count + mean), full scoreCategory median ${tFull.toFixed(1)} ms`);
  console.log(
    `scoring: bare raw-mean loop over typed arrays median ${tBare.toFixed(3)} ms, ratio ${(tFull / tBare).toFixed(0)}x`,
  );
  console.log(
    `scoring: bare raw-mean loop over the item objects median ${tBareObjects.toFixed(3)} ms, ratio ${(tFull / tBareObjects).toFixed(0)}x`,
  );

  const cal = syntheticHistograms(2000, 7);
  calibrate(cal.items, cal.observed, {}, { asOf: '2025-01-01' });
  let result: ReturnType<typeof calibrate> | null = null;
  const tCal = medianTime(3, () => {
    result = calibrate(cal.items, cal.observed, {}, { asOf: '2025-01-01' });
  });
  const best = (result as ReturnType<typeof calibrate> | null)?.best;
  console.log(
    `calibration: 2000 items, ${(result as ReturnType<typeof calibrate> | null)?.swapPointCount ?? 0} swap points, median ${tCal.toFixed(0)} ms; best m in [${best?.start.toFixed(2)}, ${best?.end?.toFixed(2) ?? 'inf'}) tau-b ${best?.tau?.toFixed(4)}`,
  );
  if (sink === 42) console.log('');
}
