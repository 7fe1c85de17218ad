import { Tinypool } from 'tinypool';
import { AppError } from '../lib/app-error';
import type { CalibrateTask } from './tasks';

/**
 * One small pool of worker threads for CPU-heavy requests. The machine has 2 cores: one worker keeps a
 * core for the event loop; a bounded queue answers 503 rather than piling requests up in memory.
 */
let pool: Tinypool | null = null;
const MAX_QUEUE = 8;

function thePool(): Tinypool {
  pool ??= new Tinypool({
    filename: new URL('./bootstrap.mjs', import.meta.url).href,
    minThreads: 0,
    maxThreads: 1,
    maxQueue: MAX_QUEUE,
    idleTimeout: 30_000,
  });
  return pool;
}

export async function runInWorker<T>(task: CalibrateTask): Promise<T> {
  const p = thePool();
  if (p.queueSize >= MAX_QUEUE)
    throw new AppError(
      'too_many_requests',
      'Ballast is busy with other heavy work; try again shortly.',
      503,
      {
        retryAfterSeconds: 5,
      },
    );
  return (await p.run(task)) as T;
}

export async function closeWorkers(): Promise<void> {
  const p = pool;
  pool = null;
  if (p) await p.destroy();
}
