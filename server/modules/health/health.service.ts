import { db } from '../../db/sequelize';
import { heavyWork } from '../../workers/pool';

export type Health = {
  status: 'ok' | 'degraded';
  db: 'up' | 'down';
  reason?: string;
  /** Heavy tasks in the worker pool now: running, and waiting for a worker. */
  heavy: { running: number; queued: number };
};

export async function checkHealth(): Promise<Health> {
  try {
    await db().query('SELECT 1');
    return { status: 'ok', db: 'up', heavy: heavyWork() };
  } catch (err) {
    const reason = err instanceof Error ? err.message.split('\n')[0] : 'unknown error';
    return {
      status: 'degraded',
      db: 'down',
      reason: `The database does not answer: ${reason}`,
      heavy: heavyWork(),
    };
  }
}
