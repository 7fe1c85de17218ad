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

describe('POST /api/jobs/backfill', () => {
  it('queues a backfill run that computes the asked weeks of a category, oldest first', async () => {
    const category = (await Category.findOne({ where: { slug: 'trail-packs' } }))!;
    const queued = await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'trail-packs', fromWeek: '2026-W40', toWeek: '2026-W42' })
      .expect(202);
    expect(queued.body.runs).toHaveLength(1);
    expect(queued.body.runs[0]).toMatchObject({
      kind: 'backfill',
      trigger: 'manual',
      categoryId: category.id,
    });
    await scheduler.idle();
    const run = await ops.get(`/api/jobs/${queued.body.runs[0].id}`).expect(200);
    expect(run.body).toMatchObject({ status: 'succeeded', isoWeek: '2026-W42' });
    expect(run.body.params).toMatchObject({ fromWeek: '2026-W40', toWeek: '2026-W42', replace: false });
    expect(run.body.log.join('\n')).toContain('Backfill wrote 3 weekly snapshots.');
    const weeks = await Snapshot.findAll({
      where: { categoryId: category.id, isoWeek: ['2026-W40', '2026-W41', '2026-W42'] },
      attributes: ['isoWeek'],
    });
    expect(weeks.map((w) => w.isoWeek).sort()).toEqual(['2026-W40', '2026-W41', '2026-W42']);
    const audit = await (
      await t.signIn('admin')
    )
      .get('/api/admin/audit?action=job.backfill_queued')
      .expect(200);
    expect(audit.body.items[0].details).toMatchObject({ categories: ['trail-packs'], fromWeek: '2026-W40' });
  });

  it('queues one run per category for "all", and refuses weeks that have not ended or run backwards', async () => {
    const all = await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'all', fromWeek: '2026-W42', toWeek: '2026-W42' })
      .expect(202);
    expect(all.body.runs).toHaveLength(await Category.count());
    await scheduler.idle();
    for (const r of all.body.runs as { id: number }[])
      expect((await ops.get(`/api/jobs/${r.id}`).expect(200)).body.status).toBe('succeeded');

    const future = await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'trail-packs', toWeek: '2099-W01' })
      .expect(400);
    expect(future.body.error.message).toContain('has not ended yet');
    const backwards = await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'trail-packs', fromWeek: '2026-W42', toWeek: '2026-W40' })
      .expect(400);
    expect(JSON.stringify(backwards.body.error)).toContain('must not come after');
    await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'trail-packs', fromWeek: '2026-W54' })
      .expect(400);
    await ops
      .post('/api/jobs/backfill')
      .set('x-csrf-token', ops.csrf)
      .send({ category: 'no-such-category' })
      .expect(404);
  });
});
