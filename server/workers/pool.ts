import os from 'node:os';
import { Tinypool } from 'tinypool';
import type { Actor } from '../lib/actor';
import { AppError } from '../lib/app-error';
import type { WorkerTask } from './tasks';

/**
 * One small pool of worker threads for every CPU-heavy request (scoring, calibration). The machine may
 * have 2 cores: by default one worker fewer than the cores keeps a core for the event loop; a bounded
 * queue answers 503 rather than piling requests up in memory.
 */
export type HeavyLimits = { workers: number; maxQueue: number; perPrincipal: number };

let limits: HeavyLimits = {
  workers: Math.max(1, os.availableParallelism() - 1),
  maxQueue: 8,
  perPrincipal: 2,
};
let pool: Tinypool | null = null;
const inFlight = new Map<string, number>();
const RETRY_AFTER_SECONDS = 5;

/** Called once by createApp with config.heavy; a running pool keeps its size until closed. */
export function configureWorkers(next: HeavyLimits): void {
  limits = next;
}

function thePool(): Tinypool {
  pool ??= new Tinypool({
    filename: new URL('./bootstrap.mjs', import.meta.url).href,
    minThreads: 0,
    maxThreads: limits.workers,
    // The bound is kept by runInWorker's own count (requests are refused past it; background work waits).
    maxQueue: Number.POSITIVE_INFINITY,
    idleTimeout: 30_000,
  });
  return pool;
}

function busy(): AppError {
  return new AppError(
    'server_busy',
    'Ballast is busy with other heavy work; try again in a few seconds.',
    503,
    { retryAfterSeconds: RETRY_AFTER_SECONDS },
  );
}

/** Places taken in the pool (workers + queue), counted before a task's input is even read. */
let reserved = 0;
/** Tasks handed to the pool: running or waiting for a worker. */
let pending = 0;

/** What the pool holds now, for /api/health and the bench. */
export function heavyWork(): { running: number; queued: number } {
  const running = Math.min(pending, limits.workers);
  return { running, queued: pending - running };
}

/**
 * Runs a task in a worker thread. A task given as a function is built (its request body read) only once
 * a place in the pool is taken, so at most workers + maxQueue request inputs are ever held in memory.
 * `wait` is for work no one should be refused (digest rendering): it queues past that bound.
 */
export async function runInWorker<T>(
  task: WorkerTask | (() => Promise<WorkerTask>),
  options: { wait?: boolean } = {},
): Promise<T> {
  const p = thePool();
  // Background work (digests of a scheduled run, one at a time) waits its turn instead of failing.
  if (!options.wait && reserved >= limits.workers + limits.maxQueue) throw busy();
  reserved += 1;
  try {
    const input = typeof task === 'function' ? await task() : task;
    pending += 1;
    try {
      return (await p.run(input)) as T;
    } finally {
      pending -= 1;
    }
  } catch (err) {
    if (err instanceof Error && /queue is at limit/i.test(err.message)) throw busy();
    throw err;
  } finally {
    reserved -= 1;
  }
}

/**
 * Holds one of the caller's heavy-request slots while work runs: one person or one token cannot fill the
 * pool and its queue for everyone else. The count lives in this process, per app server.
 */
export async function withHeavySlot<T>(actor: Actor, work: () => Promise<T>): Promise<T> {
  const key = `${actor.kind}:${actor.id}`;
  const held = inFlight.get(key) ?? 0;
  if (held >= limits.perPrincipal)
    throw new AppError(
      'too_many_requests',
      `You already have ${held} heavy requests running; wait for one to finish, then try again.`,
      429,
      { retryAfterSeconds: RETRY_AFTER_SECONDS },
    );
  inFlight.set(key, held + 1);
  try {
    return await work();
  } finally {
    const left = (inFlight.get(key) ?? 1) - 1;
    if (left > 0) inFlight.set(key, left);
    else inFlight.delete(key);
  }
}

export async function closeWorkers(): Promise<void> {
  const p = pool;
  pool = null;
  if (p) await p.destroy();
}
