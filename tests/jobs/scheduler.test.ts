import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createScheduler } from '../../jobs/index';
import { Category, JobRun, ReportSchedule } from '../../server/db/models';
import { seedDemo } from '../../server/runtime/seed';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { markersWritten, markerKinds, silentCron } from './fixtures/test-kinds';

let db: TestDatabase;
let kettlesId: number;

beforeAll(async () => {
  db = await createTestDatabase();
  await seedDemo(() => {});
  kettlesId = (await Category.findOne({ where: { slug: 'kettles-and-brewers' } }))!.id;
});
afterAll(async () => db.drop());

function weekly(name: string, lastDueAt: Date | null) {
  return ReportSchedule.create({
    name,
    cron: '0 6 * * 1',
    timeZone: 'Europe/London',
    categoryIds: [kettlesId],
    recipients: [],
    produce: 'snapshot',
    lastDueAt,
    createdBy: null,
  });
}

describe('catch-up on start', () => {
  it('runs a schedule that missed three Mondays while the server was down once, for the latest Monday', async () => {
    // Last run Monday 2 Nov 2026 06:00 (GMT = UTC). The server comes back on Wednesday 25 Nov at noon:
    // 9, 16 and 23 Nov 06:00 were missed; one catch-up run is owed, due 23 Nov 06:00 UTC.
    const schedule = await weekly('Missed Mondays', new Date('2026-11-02T06:00:00Z'));
    const now = () => new Date('2026-11-25T12:00:00Z');
    const before = (await markersWritten()).length;
    const first = createScheduler({ kinds: markerKinds, cron: silentCron, now });
    await first.start();
    await first.idle();
    await first.stop();

    const runs = await JobRun.findAll({ where: { scheduleId: schedule.id } });
    expect(runs).toHaveLength(1);
    expect(runs[0]).toMatchObject({
      trigger: 'catch_up',
      status: 'succeeded',
      categoryId: kettlesId,
      isoWeek: '2026-W47',
    });
    expect(runs[0]!.dueAt?.toISOString()).toBe('2026-11-23T06:00:00.000Z');
    expect((await markersWritten()).length - before).toBe(1);

    // A second restart the same day owes nothing more.
    const second = createScheduler({ kinds: markerKinds, cron: silentCron, now });
    await second.start();
    await second.idle();
    await second.stop();
    expect(await JobRun.count({ where: { scheduleId: schedule.id } })).toBe(1);
  });

  it('does not run a schedule whose latest occurrence already ran, nor a paused one', async () => {
    const upToDate = await weekly('Up to date', new Date('2026-11-23T06:00:00Z'));
    const paused = await weekly('Paused', new Date('2026-11-02T06:00:00Z'));
    await paused.update({ enabled: false });
    const s = createScheduler({
      kinds: markerKinds,
      cron: silentCron,
      now: () => new Date('2026-11-25T12:00:00Z'),
    });
    await s.start();
    await s.idle();
    await s.stop();
    expect(await JobRun.count({ where: { scheduleId: [upToDate.id, paused.id] } })).toBe(0);
  });
});

describe('cron ticks', () => {
  it('claims the due occurrence once even when the tick is handled twice', async () => {
    const schedule = await weekly('Tick twice', new Date('2026-11-23T06:00:00Z'));
    let clock = new Date('2026-11-30T05:59:00Z');
    const s = createScheduler({ kinds: markerKinds, cron: silentCron, now: () => clock });
    await s.start();
    clock = new Date('2026-11-30T06:00:00.050Z');
    const first = await s.fire(schedule.id);
    const second = await s.fire(schedule.id);
    await s.idle();
    await s.stop();
    expect(first).toHaveLength(1);
    expect(second).toEqual([]);
    const [run] = await JobRun.findAll({ where: { scheduleId: schedule.id } });
    expect(run).toMatchObject({ trigger: 'schedule', status: 'succeeded', isoWeek: '2026-W48' });
  });

  it('registers a node-cron task per enabled schedule in its own time zone and follows changes', async () => {
    const registered: string[] = [];
    const stopped: string[] = [];
    const s = createScheduler({
      kinds: markerKinds,
      cron: (expression, timeZone) => {
        registered.push(`${expression} ${timeZone}`);
        return { stop: () => void stopped.push(`${expression} ${timeZone}`) };
      },
      now: () => new Date('2026-11-25T12:00:00Z'),
    });
    await s.start();
    const enabled = await ReportSchedule.count({ where: { enabled: true } });
    expect(s.scheduleCount).toBe(enabled);
    const schedule = await weekly('Follows changes', new Date('2026-11-23T06:00:00Z'));
    await s.reload();
    expect(s.scheduleCount).toBe(enabled + 1);
    await schedule.update({ cron: '0 7 * * 2', timeZone: 'America/New_York' });
    await s.reload();
    expect(registered.at(-1)).toBe('0 7 * * 2 America/New_York');
    expect(stopped).toContain('0 6 * * 1 Europe/London');
    await schedule.update({ enabled: false });
    await s.reload();
    expect(s.scheduleCount).toBe(enabled);
    await s.stop();
  });
});

describe('a run whose app server died', () => {
  it('is marked failed once its heartbeat is stale and retried by a live scheduler', async () => {
    const now = new Date('2026-11-25T12:00:00Z');
    const orphan = await JobRun.create({
      scheduleId: null,
      kind: 'snapshot',
      categoryId: kettlesId,
      isoWeek: '2026-W47',
      dueAt: null,
      status: 'running',
      trigger: 'manual',
      params: { asOf: '2026-11-25T11:50:00.000Z' },
      retryOf: null,
      createdBy: 'test',
      owner: 'gone-host:4242:abcdef',
      heartbeatAt: new Date(now.getTime() - 10 * 60_000),
    });
    const fresh = await JobRun.create({
      scheduleId: null,
      kind: 'snapshot',
      categoryId: kettlesId,
      isoWeek: '2026-W47',
      dueAt: null,
      status: 'running',
      trigger: 'manual',
      params: {},
      retryOf: null,
      createdBy: 'test',
      owner: 'busy-host:1:abcdef',
      heartbeatAt: new Date(now.getTime() - 20_000),
    });
    const s = createScheduler({
      kinds: markerKinds,
      cron: silentCron,
      now: () => now,
      staleAfterMs: 120_000,
    });
    await s.start();
    await s.idle();
    await s.stop();
    await orphan.reload();
    await fresh.reload();
    expect(orphan.status).toBe('failed');
    expect(orphan.error).toContain('gone-host:4242:abcdef');
    expect(fresh.status).toBe('running');
    const retry = await JobRun.findOne({ where: { retryOf: orphan.id } });
    expect(retry).toMatchObject({
      trigger: 'retry',
      attempt: 2,
      status: 'succeeded',
      owner: s.owner,
      isoWeek: '2026-W47',
    });
    await fresh.update({ status: 'failed' });
  });
});

describe('stopping', () => {
  it('lets the running job finish and hands back claimed runs it had not started', async () => {
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    let started!: (runId: number) => void;
    const running = new Promise<number>((resolve) => (started = resolve));
    const s = createScheduler({
      // A clock at which every schedule of this file is up to date, so only the runs queued here start.
      now: () => new Date('2026-11-25T12:00:00Z'),
      kinds: {
        snapshot: async (ctx) => {
          started(ctx.runId);
          await gate;
          return markerKinds.snapshot!(ctx);
        },
      },
      cron: silentCron,
    });
    await s.start();
    const schedule = await ReportSchedule.create({
      name: 'Slow stop',
      cron: '0 6 * * 1',
      timeZone: 'UTC',
      categoryIds: null,
      recipients: [],
      produce: 'snapshot',
      lastDueAt: null,
      createdBy: null,
    });
    const { queueRuns } = await import('../../server/modules/jobs/jobs.service');
    const categories = await Category.findAll({ attributes: ['id'], order: [['id', 'ASC']], limit: 2 });
    const runs = await queueRuns(
      categories.map((c) => ({
        kind: 'snapshot' as const,
        categoryId: c.id,
        scheduleId: schedule.id,
        trigger: 'manual' as const,
        createdBy: 'test',
      })),
    );
    expect(runs.map((r) => r.id)).toContain(await running);
    const stopping = s.stop(10_000);
    release();
    expect(await stopping).toEqual({ finished: true });
    const after = await JobRun.findAll({ where: { id: runs.map((r) => r.id) }, order: [['id', 'ASC']] });
    expect(after.map((r) => [r.status, r.owner === null]).sort()).toEqual([
      ['queued', true],
      ['succeeded', false],
    ]);
    await JobRun.update({ status: 'failed' }, { where: { id: runs.map((r) => r.id), status: 'queued' } });
  });
});
