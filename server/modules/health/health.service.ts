import { db } from '../../db/sequelize';

export type Health = { status: 'ok' | 'degraded'; db: 'up' | 'down'; reason?: string };

export async function checkHealth(): Promise<Health> {
  try {
    await db().query('SELECT 1');
    return { status: 'ok', db: 'up' };
  } catch (err) {
    const reason = err instanceof Error ? err.message.split('\n')[0] : 'unknown error';
    return { status: 'degraded', db: 'down', reason: `The database does not answer: ${reason}` };
  }
}
