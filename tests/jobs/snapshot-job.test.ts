import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createScheduler } from '../../jobs/index';
import type { Scheduler } from '../../jobs/scheduler';
import { Category, Snapshot } from '../../server/db/models';
import { loadDemoForTests } from '../helpers/demo-data';
import { setupTestApp, type Agent, type TestApp } from '../helpers/test-app';
import { silentCron } from './fixtures/test-kinds';

let t: TestApp;
let ops: Agent;
let scheduler: Scheduler;

beforeAll(async () => {
  t = await setupTestApp();
  await loadDemoForTests();
  ops = await t.signIn('ops');
  // The real job definitions of Ballast (snapshot, backfill); only the cron ticks are left out.
  scheduler = createScheduler({ cron: silentCron });
  await scheduler.start();
});
afterAll(async () => {
  await scheduler?.stop(30_000);
  await t.close();
});

describe('the snapshot job on a schedule', () => {
  it('goes from a new schedule to run now, a succeeded run and a stored snapshot of the week', async () => {
    const category = (await Category.findOne({ where: { slug: 'desk-lighting' } }))!;
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({
        name: 'Desk lighting weekly',
        cron: '0 6 * * 1',
        timeZone: 'Europe/London',
        categoryIds: [category.id],
        recipients: [],
        produce: 'snapshot',
      })
      .expect(201);
    const queued = await ops
      .post(`/api/schedules/${created.body.id}/run-now`)
      .set('x-csrf-token', ops.csrf)
      .send({ replace: true })
      .expect(202);
    const week = queued.body.runs[0].isoWeek as string;
    await scheduler.idle();

    const run = await ops.get(`/api/jobs/${queued.body.runs[0].id}`).expect(200);
    expect(run.body).toMatchObject({ status: 'succeeded', trigger: 'manual', isoWeek: week });
    const snapshot = await Snapshot.findOne({ where: { categoryId: category.id, isoWeek: week } });
    expect(snapshot).not.toBeNull();
    expect(run.body.rows).toBeGreaterThan(0);
    expect(run.body.log.join('\n')).toContain(`snapshot ${snapshot!.id} of ${week}: ${run.body.rows} rows.`);

    // Running again without replace keeps the week's snapshot as it is.
    const again = await ops
      .post(`/api/schedules/${created.body.id}/run-now`)
      .set('x-csrf-token', ops.csrf)
      .send({})
      .expect(202);
    await scheduler.idle();
    const second = await ops.get(`/api/jobs/${again.body.runs[0].id}`).expect(200);
    expect(second.body).toMatchObject({ status: 'succeeded', rows: 0 });
    expect(second.body.log.join('\n')).toContain('Kept the existing snapshot.');
    expect(await Snapshot.count({ where: { categoryId: category.id, isoWeek: week } })).toBe(1);
  });
});
