import { performance } from 'node:perf_hooks';
import {
  posteriorPlan,
  sampleRankIntervals,
  scoreCategory,
  smoothedListing,
  toColumns,
  type HistogramInput,
} from '../../shared/scoring';
import { mulberry32 } from '../../shared/scoring/random';

/**
 * `npm run bench -- rank-intervals`: the rank sampler on 20,000 histogram items (five gamma draws each)
 * x 2,000 draws, beside a bare typed-array loop doing the same Marsaglia–Tsang draws and one native
 * sort per draw, in the same run. Aims (issue 19): under 3 s, at most 2x the bare loop.
 * `-- rank-intervals --items=N --draws=S` changes the size.
 */
function arg(name: string, fallback: number): number {
  const hit = process.argv.find((a) => a.startsWith(`--${name}=`));
  return hit ? Number(hit.slice(name.length + 3)) : fallback;
}

function category(size: number): HistogramInput[] {
  const rand = mulberry32(19);
  const items: HistogramInput[] = [];
  for (let i = 0; i < size; i++) {
    const n = Math.floor(Math.exp(rand() * 5.5));
    const tilt = rand();
    const h: [number, number, number, number, number] = [0, 0, 0, 0, 0];
    for (let r = 0; r < n; r++) {
      const u = rand();
      h[u < tilt * 0.2 ? 0 : u < tilt * 0.3 ? 1 : u < 0.45 ? 2 : u < 0.7 ? 3 : 4]++;
    }
    items.push({ sku: `RB-${String(i).padStart(6, '0')}`, histogram: h });
  }
  return items;
}

/** The same gamma draws and a sort per draw, with nothing kept: the floor the sampler is measured on. */
function bareLoop(shapes: Float64Array, size: number, draws: number, seed: number): number {
  let state = seed >>> 0;
  const uniform = () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = Math.imul(state ^ (state >>> 15), state | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const values = new Float64Array(size);
  let check = 0;
  for (let s = 0; s < draws; s++) {
    for (let i = 0; i < size; i++) {
      let num = 0;
      let den = 0;
      for (let k = 0; k < 5; k++) {
        const a = shapes[i * 5 + k]!;
        if (!(a > 0)) continue;
        const boosted = a < 1;
        const d = (boosted ? a + 1 : a) - 1 / 3;
        const c = 1 / Math.sqrt(9 * d);
        let g: number;
        for (;;) {
          const r = Math.sqrt(-2 * Math.log(1 - uniform()));
          const x = r * Math.cos(2 * Math.PI * uniform());
          let v = 1 + c * x;
          if (v <= 0) continue;
          v = v * v * v;
          const u = uniform();
          if (u < 1 - 0.0331 * x ** 4 || Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) {
            g = d * v;
            break;
          }
        }
        if (boosted) g *= Math.pow(1 - uniform(), 1 / a);
        num += (k + 1) * g;
        den += g;
      }
      values[i] = num / den;
    }
    values.sort();
    check += values[size - 1]!;
  }
  return check;
}

export async function run(): Promise<void> {
  const size = arg('items', 20_000);
  const draws = arg('draws', 2_000);
  const items = category(size);
  const asOf = '2026-11-30T00:00:00Z';
  const scored = scoreCategory(items, {}, { asOf });
  const { m, starShares } = scored.resolved;
  const plan = posteriorPlan(toColumns(items, asOf, scored.resolved), scored.resolved);
  const listing = smoothedListing(scored);
  const shapes = new Float64Array(size * 5);
  items.forEach((it, i) => it.histogram.forEach((c, k) => (shapes[i * 5 + k] = m * starShares![k]! + c)));

  const heapBefore = process.memoryUsage().heapUsed;
  let t = performance.now();
  const result = sampleRankIntervals(plan, listing, { draws, seed: 1 });
  const engineMs = performance.now() - t;
  t = performance.now();
  const check = bareLoop(shapes, size, draws, 1);
  const bareMs = performance.now() - t;

  const ratio = engineMs / bareMs;
  let widthSum = 0;
  for (let i = 0; i < size; i++) widthSum += result.upperRank[i]! - result.lowerRank[i]!;
  console.log(`${size} items x ${draws} draws (${plan.d.length} gamma slots per draw)`);
  console.log(
    `  sampler     ${(engineMs / 1000).toFixed(2)} s   aim < 3 s: ${engineMs < 3000 ? 'met' : 'not met'}`,
  );
  console.log(`  bare loop   ${(bareMs / 1000).toFixed(2)} s   (check ${check.toFixed(3)})`);
  console.log(`  ratio       ${ratio.toFixed(2)}x     aim <= 2x: ${ratio <= 2 ? 'met' : 'not met'}`);
  console.log(
    `  kept        ${(result.bytesKept / 1e6).toFixed(1)} MB of counters (exact ranks to ${result.exactUpTo}); S x N matrix would be ${((size * draws * 4) / 1e6).toFixed(0)} MB`,
  );
  console.log(`  heap growth ${((process.memoryUsage().heapUsed - heapBefore) / 1e6).toFixed(1)} MB`);
  console.log(`  mean 90 % interval width ${(widthSum / size).toFixed(1)} places`);
}
