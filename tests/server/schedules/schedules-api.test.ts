import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createScheduler } from '../../../jobs/index';
import type { Scheduler } from '../../../jobs/scheduler';
import { AuditEvent, Category, JobRun } from '../../../server/db/models';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';
import { markersWritten, markerKinds, silentCron } from '../../jobs/fixtures/test-kinds';

let t: TestApp;
let ops: Agent;
let scheduler: Scheduler;
let kettlesId: number;
let lightingId: number;

const valid = {
  name: 'Monday morning',
  cron: '0 6 * * 1',
  timeZone: 'Europe/London',
  categoryIds: null as number[] | null,
  recipients: ['Team.Lead@example.com'],
  produce: 'snapshot',
  enabled: true,
};

beforeAll(async () => {
  t = await setupTestApp();
  ops = await t.signIn('ops');
  kettlesId = (await Category.findOne({ where: { slug: 'kettles-and-brewers' } }))!.id;
  lightingId = (await Category.findOne({ where: { slug: 'desk-lighting' } }))!.id;
  scheduler = createScheduler({ kinds: markerKinds, cron: silentCron, log: () => {} });
  await scheduler.start();
});
afterAll(async () => {
  await scheduler?.stop(5000);
  await t.close();
});

async function auditActions(targetId: number): Promise<string[]> {
  const rows = await AuditEvent.findAll({
    where: { targetType: 'schedule', targetId: String(targetId) },
    order: [['id', 'ASC']],
  });
  return rows.map((r) => r.action);
}

describe('GET /api/schedules/preview', () => {
  it('refuses a minute of 61 with a message naming the field and its range', async () => {
    const res = await ops.get('/api/schedules/preview').query({ cron: '61 * * * *', tz: 'UTC' }).expect(400);
    expect(res.body.error.message).toBe(
      'Cron expression: The minute field allows 0–59; "61" is outside that range.',
    );
  });

  it('refuses an expression with the wrong number of fields and an unknown time zone', async () => {
    const fields = await ops.get('/api/schedules/preview').query({ cron: '0 6 * *', tz: 'UTC' }).expect(400);
    expect(fields.body.error.message).toContain('five fields');
    const zone = await ops
      .get('/api/schedules/preview')
      .query({ cron: '0 6 * * 1', tz: 'Europe/Atlantis' })
      .expect(400);
    expect(zone.body.error.message).toBe(
      'Time zone: Use an IANA time zone name such as Europe/London or America/New_York.',
    );
  });

  it('lists the next five runs across the spring change in London, skipping the missing hour forward', async () => {
    // 01:30 every day. On 29 March 2026 London clocks jump from 01:00 GMT to 02:00 BST, so 01:30 does not
    // exist that night; the run happens at 02:30 BST (01:30 UTC), then 01:30 BST (00:30 UTC) from the 30th.
    const res = await ops
      .get('/api/schedules/preview')
      .query({ cron: '30 1 * * *', tz: 'Europe/London', from: '2026-03-27T12:00:00Z' })
      .expect(200);
    expect(res.body.description).toBe('At 01:30');
    expect(res.body.nextRuns).toEqual([
      '2026-03-28T01:30:00+00:00',
      '2026-03-29T02:30:00+01:00',
      '2026-03-30T01:30:00+01:00',
      '2026-03-31T01:30:00+01:00',
      '2026-04-01T01:30:00+01:00',
    ]);
  });

  it('keeps Monday 09:00 in New York at 09:00 local when daylight saving ends on 1 November 2026', async () => {
    // 26 Oct is still EDT (UTC−4): 13:00 UTC. From 2 Nov it is EST (UTC−5): 14:00 UTC, still 09:00 local.
    const res = await ops
      .get('/api/schedules/preview')
      .query({ cron: '0 9 * * 1', tz: 'America/New_York', from: '2026-10-20T00:00:00Z' })
      .expect(200);
    expect(res.body.nextRuns).toEqual([
      '2026-10-26T09:00:00-04:00',
      '2026-11-02T09:00:00-05:00',
      '2026-11-09T09:00:00-05:00',
      '2026-11-16T09:00:00-05:00',
      '2026-11-23T09:00:00-05:00',
    ]);
    expect(res.body.nextRuns.map((s: string) => new Date(s).toISOString().slice(11, 16))).toEqual([
      '13:00',
      '14:00',
      '14:00',
      '14:00',
      '14:00',
    ]);
  });

  it('runs once, not twice, in the repeated hour of the autumn change in London', async () => {
    // On 25 October 2026 01:00–02:00 happens twice (BST, then GMT); 01:30 runs at its first occurrence.
    const res = await ops
      .get('/api/schedules/preview')
      .query({ cron: '30 1 * * *', tz: 'Europe/London', from: '2026-10-24T12:00:00Z' })
      .expect(200);
    expect(res.body.nextRuns.slice(0, 3)).toEqual([
      '2026-10-25T01:30:00+01:00',
      '2026-10-26T01:30:00+00:00',
      '2026-10-27T01:30:00+00:00',
    ]);
  });
});

describe('POST /api/schedules', () => {
  it('creates a schedule, reads it in plain words and records schedule.created', async () => {
    const res = await ops.post('/api/schedules').set('x-csrf-token', ops.csrf).send(valid).expect(201);
    expect(res.body).toMatchObject({
      name: 'Monday morning',
      cron: '0 6 * * 1',
      timeZone: 'Europe/London',
      description: 'At 06:00, only on Monday',
      categoryIds: null,
      recipients: ['team.lead@example.com'],
      produce: 'snapshot',
      enabled: true,
    });
    expect(res.body.nextRunAt).toMatch(/T06:00:00\+00:00$/);
    expect(await auditActions(res.body.id)).toEqual(['schedule.created']);
  });

  it('answers 400 with a clear message for an invalid cron expression and creates nothing', async () => {
    const res = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Broken', cron: '61 * * * *' })
      .expect(400);
    expect(res.body.error.message).toBe(
      'Cron expression: The minute field allows 0–59; "61" is outside that range.',
    );
    const list = await ops.get('/api/schedules').expect(200);
    expect(list.body.map((s: { name: string }) => s.name)).not.toContain('Broken');
  });

  it('refuses a recipient that is not an e-mail address, an unknown category and a duplicate name', async () => {
    const mail = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Mail', recipients: ['not-an-address'] })
      .expect(400);
    // The message names the bad address and the field in the user's words, never a path like recipients.0.
    expect(mail.body.error.message).toBe('Extra recipients: not-an-address is not a valid e-mail address.');
    const category = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Ghost', categoryIds: [999_999] })
      .expect(400);
    expect(category.body.error.message).toBe('Unknown category id(s): 999999.');
    await ops.post('/api/schedules').set('x-csrf-token', ops.csrf).send(valid).expect(409);
  });
});

describe('PATCH and DELETE /api/schedules/:id', () => {
  it('audits an edit with what changed, and pausing and resuming as their own events', async () => {
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Edited', categoryIds: [kettlesId] })
      .expect(201);
    const id = created.body.id as number;
    const edited = await ops
      .patch(`/api/schedules/${id}`)
      .set('x-csrf-token', ops.csrf)
      .send({ cron: '15 7 * * 1-5', timeZone: 'America/New_York' })
      .expect(200);
    expect(edited.body.description).toBe('At 07:15, Monday through Friday');
    expect(edited.body.nextRunAt).toMatch(/T07:15:00-0[45]:00$/);
    const paused = await ops
      .patch(`/api/schedules/${id}`)
      .set('x-csrf-token', ops.csrf)
      .send({ enabled: false })
      .expect(200);
    expect(paused.body.nextRunAt).toBeNull();
    await ops.patch(`/api/schedules/${id}`).set('x-csrf-token', ops.csrf).send({ enabled: true }).expect(200);
    await ops.delete(`/api/schedules/${id}`).set('x-csrf-token', ops.csrf).expect(204);
    await ops.get(`/api/schedules/${id}`).expect(404);
    expect(await auditActions(id)).toEqual([
      'schedule.created',
      'schedule.updated',
      'schedule.paused',
      'schedule.resumed',
      'schedule.deleted',
    ]);
    const updated = await AuditEvent.findOne({ where: { action: 'schedule.updated', targetId: String(id) } });
    const details = (
      typeof updated!.details === 'string' ? JSON.parse(updated!.details) : updated!.details
    ) as Record<string, { from: unknown; to: unknown }>;
    expect(details.cron).toEqual({ from: '0 6 * * 1', to: '15 7 * * 1-5' });
    expect(details.timeZone).toEqual({ from: 'Europe/London', to: 'America/New_York' });
  });

  it('keeps every field it was not asked to change through pause, resume and a one-field edit', async () => {
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({
        ...valid,
        name: 'Every field kept',
        cron: '30 5 * * 2',
        timeZone: 'Pacific/Auckland',
        categoryIds: [kettlesId, lightingId],
        recipients: ['first.reader@example.com', 'second.reader@example.com'],
        produce: 'snapshot_digest',
      })
      .expect(201);
    const id = created.body.id as number;
    const kept = (body: Record<string, unknown>) => ({
      name: body.name,
      cron: body.cron,
      timeZone: body.timeZone,
      categoryIds: body.categoryIds,
      recipients: body.recipients,
      produce: body.produce,
    });
    const original = kept(created.body);
    const patch = (send: Record<string, unknown>) =>
      ops.patch(`/api/schedules/${id}`).set('x-csrf-token', ops.csrf).send(send).expect(200);

    const paused = await patch({ enabled: false });
    expect(kept(paused.body)).toEqual(original);
    expect(paused.body.enabled).toBe(false);
    const renamedWhilePaused = await patch({ name: 'Every field kept, renamed' });
    expect(renamedWhilePaused.body.enabled).toBe(false);
    expect(kept(renamedWhilePaused.body)).toEqual({ ...original, name: 'Every field kept, renamed' });
    const resumed = await patch({ enabled: true });
    expect(kept(resumed.body)).toEqual({ ...original, name: 'Every field kept, renamed' });
    const read = await ops.get(`/api/schedules/${id}`).expect(200);
    expect(kept(read.body)).toEqual({ ...original, name: 'Every field kept, renamed' });
    expect(read.body.enabled).toBe(true);

    const updates = await AuditEvent.findAll({ where: { action: 'schedule.updated', targetId: String(id) } });
    const changed = updates.flatMap((u) =>
      Object.keys((typeof u.details === 'string' ? JSON.parse(u.details) : u.details) as object),
    );
    expect(changed).toEqual(['name']);
  });

  it('keeps the job history of a deleted schedule', async () => {
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Short-lived', categoryIds: [lightingId] })
      .expect(201);
    const run = await ops
      .post(`/api/schedules/${created.body.id}/run-now`)
      .set('x-csrf-token', ops.csrf)
      .send({})
      .expect(202);
    await scheduler.idle();
    await ops.delete(`/api/schedules/${created.body.id}`).set('x-csrf-token', ops.csrf).expect(204);
    const after = await ops.get(`/api/jobs/${run.body.runs[0].id}`).expect(200);
    expect(after.body).toMatchObject({ scheduleId: null, status: 'succeeded', categoryId: lightingId });
  });
});

describe('POST /api/schedules/:id/run-now', () => {
  it('queues one run per chosen category, which the scheduler runs, and audits schedule.run_now', async () => {
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'Two categories', categoryIds: [lightingId, kettlesId] })
      .expect(201);
    const before = (await markersWritten()).length;
    const res = await ops
      .post(`/api/schedules/${created.body.id}/run-now`)
      .set('x-csrf-token', ops.csrf)
      .send({})
      .expect(202);
    expect(res.body.runs).toHaveLength(2);
    expect(res.body.runs.map((r: { trigger: string; status: string }) => [r.trigger, r.status])).toEqual([
      ['manual', 'queued'],
      ['manual', 'queued'],
    ]);
    await scheduler.idle();
    const markers = (await markersWritten()).slice(before);
    expect(markers.map((m) => m.categoryId).sort()).toEqual([kettlesId, lightingId].sort());
    const list = await ops.get('/api/jobs').query({ status: 'succeeded', category: kettlesId }).expect(200);
    const ours = list.body.items.filter((r: { scheduleId: number }) => r.scheduleId === created.body.id);
    expect(ours).toHaveLength(1);
    expect(ours[0]).toMatchObject({
      scheduleName: 'Two categories',
      rows: 1,
      createdBy: 'otto.ops@demo.ballast.test',
    });
    const detail = await ops.get(`/api/jobs/${ours[0].id}`).expect(200);
    expect(detail.body.log.join('\n')).toContain(`Writing the marker for category ${kettlesId}.`);
    expect(await auditActions(created.body.id)).toEqual(['schedule.created', 'schedule.run_now']);
  });
});

describe('steps of a run', () => {
  it('runs the digest step after the snapshot for snapshot + digest, and says so when it is not available', async () => {
    const created = await ops
      .post('/api/schedules')
      .set('x-csrf-token', ops.csrf)
      .send({ ...valid, name: 'With digest', categoryIds: [kettlesId], produce: 'snapshot_digest' })
      .expect(201);
    const res = await ops
      .post(`/api/schedules/${created.body.id}/run-now`)
      .set('x-csrf-token', ops.csrf)
      .send({})
      .expect(202);
    await scheduler.idle();
    const run = await ops.get(`/api/jobs/${res.body.runs[0].id}`).expect(200);
    expect(run.body).toMatchObject({ status: 'succeeded', rows: 1 });
    expect(run.body.params.then).toEqual(['digest']);
    // This scheduler was given only the marker job, so the digest step has no definition here.
    expect(run.body.log[0]).toContain('snapshot → digest');
    expect(run.body.log.join('\n')).toContain(
      'This app server has no job definition for the step "digest"; skipped.',
    );
  });
});

describe('GET /api/jobs', () => {
  it('filters by status and category and pages through the history', async () => {
    const all = await ops.get('/api/jobs').query({ pageSize: 1 }).expect(200);
    expect(all.body.total).toBeGreaterThanOrEqual(3);
    expect(all.body.items).toHaveLength(1);
    const page2 = await ops.get('/api/jobs').query({ pageSize: 1, page: 2 }).expect(200);
    expect(page2.body.items[0].id).toBeLessThan(all.body.items[0].id);
    const failed = await ops.get('/api/jobs').query({ status: 'failed' }).expect(200);
    expect(failed.body.items.every((r: { status: string }) => r.status === 'failed')).toBe(true);
    const lighting = await ops.get('/api/jobs').query({ category: lightingId }).expect(200);
    expect(lighting.body.items.length).toBeGreaterThan(0);
    expect(lighting.body.items.every((r: { categoryId: number }) => r.categoryId === lightingId)).toBe(true);
    await ops.get('/api/jobs').query({ status: 'exploded' }).expect(400);
  });
});

describe('POST /api/jobs/:id/retry', () => {
  it('retries a failed run as a new attempt that succeeds, and refuses to retry a success', async () => {
    let failNext = true;
    const flaky = createScheduler({
      kinds: {
        snapshot: async (ctx) => {
          if (failNext) {
            failNext = false;
            throw new Error('The category was being re-imported; try again.');
          }
          return markerKinds.snapshot!(ctx);
        },
      },
      cron: silentCron,
    });
    await scheduler.stop(5000);
    await flaky.start();
    try {
      const created = await ops
        .post('/api/schedules')
        .set('x-csrf-token', ops.csrf)
        .send({ ...valid, name: 'Flaky', categoryIds: [kettlesId] })
        .expect(201);
      const first = await ops
        .post(`/api/schedules/${created.body.id}/run-now`)
        .set('x-csrf-token', ops.csrf)
        .send({})
        .expect(202);
      await flaky.idle();
      const failed = await ops.get(`/api/jobs/${first.body.runs[0].id}`).expect(200);
      expect(failed.body).toMatchObject({
        status: 'failed',
        error: 'The category was being re-imported; try again.',
      });
      expect(failed.body.log.at(-1)).toContain('Failed: The category was being re-imported; try again.');

      const retry = await ops
        .post(`/api/jobs/${failed.body.id}/retry`)
        .set('x-csrf-token', ops.csrf)
        .expect(202);
      expect(retry.body).toMatchObject({
        trigger: 'retry',
        retryOf: failed.body.id,
        attempt: 2,
        status: 'queued',
      });
      await flaky.idle();
      const done = await ops.get(`/api/jobs/${retry.body.id}`).expect(200);
      expect(done.body).toMatchObject({ status: 'succeeded', rows: 1, isoWeek: failed.body.isoWeek });
      expect(done.body.params.asOf).toBe(failed.body.params.asOf);

      const again = await ops
        .post(`/api/jobs/${done.body.id}/retry`)
        .set('x-csrf-token', ops.csrf)
        .expect(409);
      expect(again.body.error.message).toBe('Only failed runs can be retried; this one is succeeded.');
      const audit = await AuditEvent.count({
        where: { action: 'job.retried', targetId: String(failed.body.id) },
      });
      expect(audit).toBe(1);
    } finally {
      await flaky.stop(5000);
      scheduler = createScheduler({ kinds: markerKinds, cron: silentCron });
      await scheduler.start();
    }
  });
});

describe('who may use schedules and jobs', () => {
  it('lets admin in and keeps analysts, managers and execs out', async () => {
    const admin = await t.signIn('admin');
    await admin.get('/api/schedules').expect(200);
    await admin.get('/api/jobs').expect(200);
    for (const role of ['analyst', 'manager', 'exec'] as const) {
      const agent = await t.signIn(role);
      await agent.get('/api/schedules').expect(403);
      await agent.get('/api/jobs').expect(403);
      await agent.post('/api/schedules').set('x-csrf-token', agent.csrf).send(valid).expect(403);
    }
    expect(await JobRun.count({ where: { createdBy: 'mira.manager@demo.ballast.test' } })).toBe(0);
  });
});
