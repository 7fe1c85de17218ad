import { spawn } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../server/config/env';
import { Category, JobRun, ReportSchedule } from '../../server/db/models';
import { seedDemo } from '../../server/runtime/seed';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { markersWritten } from './fixtures/test-kinds';

let db: TestDatabase;

beforeAll(async () => {
  db = await createTestDatabase();
  await seedDemo(() => {});
});
afterAll(async () => db.drop());

type WorkerResult = { owner: string; claimed: number[]; ran: number[] };

/** Two separate Node processes, each with its own connection pool, as two app servers would be. */
function worker(
  mode: 'start' | 'tick',
  scheduleId: number,
  now: string,
  goAt: number,
): Promise<WorkerResult> {
  return new Promise((resolve, reject) => {
    let out = '';
    let err = '';
    const child = spawn(
      process.execPath,
      [
        '--import',
        'tsx',
        path.join(rootDir, 'tests/jobs/fixtures/race-worker.ts'),
        db.url,
        mode,
        String(scheduleId),
        now,
        String(goAt),
      ],
      { cwd: rootDir, stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, NODE_ENV: 'test' } },
    );
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (err += d.toString()));
    child.on('exit', (code) => {
      if (code !== 0) return reject(new Error(`worker exited with ${code}: ${err}`));
      resolve(JSON.parse(out.trim().split('\n').at(-1)!) as WorkerResult);
    });
  });
}

async function race(mode: 'start' | 'tick', scheduleId: number, now: string): Promise<WorkerResult[]> {
  const goAt = Date.now() + 6000;
  return Promise.all([worker(mode, scheduleId, now, goAt), worker(mode, scheduleId, now, goAt)]);
}

describe('two app servers on one database', () => {
  it('run a missed occurrence exactly once when both start after an outage', async () => {
    const categories = await Category.count();
    // Every day at 05:00 UTC; last claimed on 20 Nov, both servers start on 26 Nov at 12:00: the
    // occurrences of 21–26 Nov were missed, and only the latest (26 Nov 05:00) is owed, once per category.
    const schedule = await ReportSchedule.create({
      name: 'Race after outage',
      cron: '0 5 * * *',
      timeZone: 'UTC',
      categoryIds: null,
      recipients: [],
      produce: 'snapshot',
      lastDueAt: new Date('2026-11-20T05:00:00Z'),
      createdBy: null,
    });
    const before = (await markersWritten()).length;
    const results = await race('start', schedule.id, '2026-11-26T12:00:00Z');

    const runs = await JobRun.findAll({ where: { scheduleId: schedule.id } });
    expect(runs).toHaveLength(categories);
    expect(new Set(runs.map((r) => r.categoryId)).size).toBe(categories);
    expect(runs.every((r) => r.dueAt?.toISOString() === '2026-11-26T05:00:00.000Z')).toBe(true);
    expect(runs.every((r) => r.trigger === 'catch_up' && r.status === 'succeeded')).toBe(true);
    const ran = results.flatMap((r) => r.ran).sort((a, b) => a - b);
    expect(ran).toEqual(runs.map((r) => r.id).sort((a, b) => a - b));
    expect((await markersWritten()).length - before).toBe(categories);
    expect(new Set(runs.map((r) => r.owner))).toSatisfy((owners: Set<string | null>) =>
      [...owners].every((o) => results.some((r) => r.owner === o)),
    );
    await schedule.reload();
    expect(schedule.lastDueAt?.toISOString()).toBe('2026-11-26T05:00:00.000Z');
  });

  it('turn one cron tick into one run per category, whichever process wins each', async () => {
    const categories = await Category.count();
    const schedule = await ReportSchedule.create({
      name: 'Race on tick',
      cron: '30 8 * * 1',
      timeZone: 'Europe/London',
      categoryIds: null,
      recipients: [],
      produce: 'snapshot',
      // Nothing missed: the last occurrence before the tick was claimed.
      lastDueAt: new Date('2026-11-23T08:30:00Z'),
      createdBy: null,
    });
    // Monday 30 Nov 2026 08:30 London (GMT) = 08:30 UTC; both ticks arrive 200 ms after.
    const results = await race('tick', schedule.id, '2026-11-30T08:30:00.200Z');
    const runs = await JobRun.findAll({ where: { scheduleId: schedule.id } });
    expect(runs).toHaveLength(categories);
    expect(runs.every((r) => r.trigger === 'schedule' && r.status === 'succeeded')).toBe(true);
    expect(runs.every((r) => r.dueAt?.toISOString() === '2026-11-30T08:30:00.000Z')).toBe(true);
    const claimed = results.flatMap((r) => r.claimed);
    expect(claimed.sort((a, b) => a - b)).toEqual(runs.map((r) => r.id).sort((a, b) => a - b));
    expect(new Set(claimed).size).toBe(claimed.length);
  });
});
