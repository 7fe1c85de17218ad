import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createScheduler } from '../../jobs/index';
import { JobRun, ReportSchedule } from '../../server/db/models';
import { db } from '../../server/db/sequelize';
import { seedDemo } from '../../server/runtime/seed';
import { loadDemoForTests } from '../helpers/demo-data';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { silentCron } from './fixtures/test-kinds';

let db0: TestDatabase;

beforeAll(async () => {
  db0 = await createTestDatabase();
  await seedDemo(() => {});
  await loadDemoForTests({ weeks: 1 });
}, 180_000);
afterAll(async () => db0.drop());

describe('the daily alert check', () => {
  it('is a schedule Ballast starts with, and each run checks one category as of the scheduler clock', async () => {
    const schedule = await ReportSchedule.findOne({ where: { produce: 'alerts' } });
    expect(schedule).toMatchObject({
      name: 'Daily alert check',
      cron: '0 7 * * *',
      timeZone: 'UTC',
      enabled: true,
    });
    const due = new Date('2026-12-02T07:00:00Z');
    const scheduler = createScheduler({ cron: silentCron, now: () => due });
    await scheduler.start();
    const ids = await scheduler.fire(schedule!.id);
    await scheduler.idle();
    await scheduler.stop();
    expect(ids.length).toBe(5);
    const runs = await JobRun.findAll({ where: { id: ids } });
    expect(runs.every((r) => r.kind === 'alerts' && r.status === 'succeeded')).toBe(true);
    const [states] = (await db().query('SELECT category_id, evaluated_at FROM alert_states')) as [
      { category_id: number; evaluated_at: Date }[],
      unknown,
    ];
    expect(states).toHaveLength(5);
    expect(states.every((s) => new Date(s.evaluated_at).toISOString() === due.toISOString())).toBe(true);
  });
});
