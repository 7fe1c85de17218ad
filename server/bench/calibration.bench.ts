import type { CalibrationResult } from '../../shared/scoring';
import { closeWorkers, runInWorker } from '../workers/pool';

/**
 * Calibration in the worker pool at the aim (50,000 items under 5 s and 500 MB) and at smaller
 * sizes, with invented items. Process RSS (main thread and worker) is sampled while it runs.
 */
function invented(size: number, seed = 7) {
  let x = seed;
  const rand = () => (x = (x * 1103515245 + 12345) % 2147483648) / 2147483648;
  const items = Array.from({ length: size }, (_, i) => ({
    sku: `BX-${String(i).padStart(6, '0')}`,
    count: 1 + Math.floor(rand() * rand() * 400),
    mean: 1 + rand() * 4,
  }));
  const observed = items
    .map((it) => ({ sku: it.sku, key: (it.mean * it.count + 4 * 20) / (it.count + 20) + rand() * 0.3 }))
    .sort((a, b) => b.key - a.key)
    .map((o) => o.sku);
  return { items, observed };
}

export async function run(): Promise<void> {
  for (const size of [2_000, 20_000, 50_000]) {
    const { items, observed } = invented(size);
    let peak = process.memoryUsage().rss;
    const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 50);
    const started = performance.now();
    const cpuStart = process.cpuUsage();
    let outcome: string;
    try {
      const r = await runInWorker<CalibrationResult>({
        kind: 'calibrate',
        items: items as never,
        observed,
        settings: {},
        asOf: '2026-12-01',
      });
      outcome = `matched ${r.matchedCount}, ${r.swapPointCount} swap points`;
    } catch (err) {
      outcome = `FAILED: ${err instanceof Error ? err.message : String(err)}`;
    }
    clearInterval(timer);
    const seconds = (performance.now() - started) / 1000;
    // CPU time of the whole process (main thread and worker): on a shared machine the wall time also
    // counts the time other processes held the cores.
    const cpu = process.cpuUsage(cpuStart);
    const cpuSeconds = (cpu.user + cpu.system) / 1e6;
    const mb = peak / 2 ** 20;
    const aim =
      size === 50_000
        ? ` (aim: < 5 s, < 500 MB: ${seconds < 5 && mb < 500 && !outcome.startsWith('FAILED') ? 'met' : 'NOT met'})`
        : '';
    console.log(
      `calibrate ${size} items: ${seconds.toFixed(2)} s (CPU ${cpuSeconds.toFixed(2)} s), peak RSS ${mb.toFixed(0)} MB; ${outcome}${aim}`,
    );
  }
  await closeWorkers();
}
