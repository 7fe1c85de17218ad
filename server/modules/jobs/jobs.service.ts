import { Op, UniqueConstraintError, type WhereOptions } from 'sequelize';
import { lastCompletedIsoWeek } from '../../../shared/iso-week';
import type {
  BackfillInput,
  JobKind,
  JobList,
  JobListQuery,
  JobParams,
  JobRunDetail,
  JobRunRecord,
  JobTrigger,
} from '../../../shared/schemas/jobs.schema';
import { Category, JobRun, ReportSchedule } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { countOf } from '../../../shared/plural';
import { jobEvents } from './job-events';

/** Lines kept per run: the first ones (how it started) and the newest ones (how it ended). */
export const LOG_HEAD_LINES = 300;
export const LOG_TAIL_LINES = 200;
const LOG_MAX_CHARS = 60_000;

type RunWithJoins = JobRun & { schedule?: ReportSchedule | null; category?: Category | null };

const joins = [
  { model: ReportSchedule, as: 'schedule', attributes: ['id', 'name'], required: false },
  { model: Category, as: 'category', attributes: ['id', 'name'], required: false },
];

function parseJson<T>(value: unknown, fallback: T): T {
  if (value === null || value === undefined) return fallback;
  if (typeof value === 'string') {
    try {
      return JSON.parse(value) as T;
    } catch {
      return fallback;
    }
  }
  return value as T;
}

function toRecord(run: RunWithJoins): JobRunRecord {
  return {
    id: run.id,
    scheduleId: run.scheduleId,
    scheduleName: run.schedule?.name ?? null,
    kind: run.kind,
    categoryId: run.categoryId,
    categoryName: run.category?.name ?? null,
    isoWeek: run.isoWeek,
    dueAt: run.dueAt?.toISOString() ?? null,
    status: run.status,
    trigger: run.trigger,
    startedAt: run.startedAt?.toISOString() ?? null,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    durationMs: run.durationMs,
    rows: run.rows,
    error: run.error,
    attempt: run.attempt,
    retryOf: run.retryOf,
    createdBy: run.createdBy,
    owner: run.owner,
    createdAt: run.createdAt.toISOString(),
  };
}

export function splitLog(log: string | null): string[] {
  return log ? log.split('\n') : [];
}

/** Keeps a run's log inside its column: the head, a marker of what was left out, and the tail. */
export function capLog(lines: string[]): string {
  let kept = lines;
  if (lines.length > LOG_HEAD_LINES + LOG_TAIL_LINES) {
    const left = lines.length - LOG_HEAD_LINES - LOG_TAIL_LINES;
    kept = [
      ...lines.slice(0, LOG_HEAD_LINES),
      `… ${countOf(left, 'line')} left out …`,
      ...lines.slice(-LOG_TAIL_LINES),
    ];
  }
  let text = kept.map((l) => (l.length > 500 ? `${l.slice(0, 500)}…` : l)).join('\n');
  if (text.length > LOG_MAX_CHARS) text = `…${text.slice(-(LOG_MAX_CHARS - 1))}`;
  return text;
}

export async function listJobRuns(query: JobListQuery): Promise<JobList> {
  const where: WhereOptions<JobRun> = {
    ...(query.status ? { status: query.status } : {}),
    ...(query.category ? { categoryId: query.category } : {}),
    ...(query.schedule ? { scheduleId: query.schedule } : {}),
  };
  const [{ rows, count }, active] = await Promise.all([
    JobRun.findAndCountAll({
      where,
      include: joins,
      order: [
        ['createdAt', 'DESC'],
        ['id', 'DESC'],
      ],
      limit: query.pageSize,
      offset: (query.page - 1) * query.pageSize,
    }),
    JobRun.count({ where: { status: ['queued', 'running'] } }),
  ]);
  return { items: rows.map(toRecord), total: count, active };
}

export async function getJobRun(id: number): Promise<JobRunDetail> {
  const run = await JobRun.findByPk(id, { include: joins });
  if (!run) throw AppError.notFound('The job run');
  return {
    ...toRecord(run),
    log: splitLog(run.log),
    params: parseJson<JobParams>(run.params, {}),
    heartbeatAt: run.heartbeatAt?.toISOString() ?? null,
  };
}

export type NewRun = {
  kind: JobKind;
  categoryId: number | null;
  scheduleId?: number | null;
  isoWeek?: string | null;
  params?: JobParams;
  trigger: Extract<JobTrigger, 'manual' | 'retry'>;
  createdBy: string;
  retryOf?: number | null;
  attempt?: number;
  /** Set when the caller runs the job itself (the command line); otherwise any scheduler may claim it. */
  owner?: string | null;
  now?: Date;
};

/** Queues runs that are not tied to a due time; a scheduler in any process claims each one once. */
export async function queueRuns(runs: NewRun[]): Promise<JobRunRecord[]> {
  const created: JobRun[] = [];
  for (const r of runs) {
    const now = r.now ?? new Date();
    created.push(
      await JobRun.create({
        scheduleId: r.scheduleId ?? null,
        kind: r.kind,
        categoryId: r.categoryId,
        isoWeek: r.isoWeek ?? null,
        dueAt: null,
        trigger: r.trigger,
        params: r.params ?? {},
        retryOf: r.retryOf ?? null,
        attempt: r.attempt ?? 1,
        createdBy: r.createdBy,
        owner: r.owner ?? null,
        heartbeatAt: r.owner ? now : null,
      }),
    );
  }
  if (created.length > 0) jobEvents.emit('runs-queued');
  const ids = created.map((c) => c.id);
  const rows = await JobRun.findAll({ where: { id: ids }, include: joins, order: [['id', 'ASC']] });
  return rows.map(toRecord);
}

/** Category ids of a schedule's selection that still exist; null selection means every category. */
export async function categoriesFor(categoryIds: number[] | null): Promise<number[]> {
  const rows = await Category.findAll({
    where: categoryIds ? { id: categoryIds } : {},
    attributes: ['id'],
    order: [['id', 'ASC']],
  });
  return rows.map((c) => c.id);
}

/**
 * On a Galera cluster two app servers may insert the same claim on different nodes at once; both commit
 * locally and the loser's commit fails certification, reported as a deadlock (1213). That is a claim lost
 * to another server, like a duplicate key on a single server, not an error.
 */
export function isCertificationConflict(err: unknown): boolean {
  for (
    let e = err as { errno?: unknown; parent?: unknown; original?: unknown } | null, i = 0;
    e && i < 4;
    i++
  ) {
    if (e.errno === 1213) return true;
    e = (e.parent ?? e.original ?? null) as typeof e;
  }
  return false;
}

/** Tries of one claim that keeps failing certification before it counts as an error. */
const claimAttempts = 5;

export type DueClaim = {
  scheduleId: number;
  dueAt: Date;
  trigger: Extract<JobTrigger, 'schedule' | 'catch_up'>;
  owner: string;
  now: Date;
};

/**
 * Claims the runs of one due occurrence of a schedule, one per category, by inserting them under the
 * unique key (schedule, due time, category): whichever process inserts a row first owns that run, every
 * other process gets a duplicate-key error and leaves it alone. Returns the ids this caller now owns.
 */
export async function claimDueRuns(claim: DueClaim): Promise<number[]> {
  const schedule = await ReportSchedule.findByPk(claim.scheduleId);
  if (!schedule || !schedule.enabled) return [];
  const categoryIds = await categoriesFor(parseJson<number[] | null>(schedule.categoryIds, null));
  const then: JobKind[] = schedule.produce === 'snapshot_digest' ? ['digest'] : [];
  const isoWeek = lastCompletedIsoWeek(claim.dueAt);
  const claimed: number[] = [];
  for (const categoryId of categoryIds) {
    // A certification conflict is usually another server's claim of the same run, but it may also be a
    // write on a row this insert only refers to (the schedule); trying again settles which: a duplicate
    // key then says the run is taken, success that it was free.
    for (let attempt = 1; ; attempt++) {
      try {
        const run = await JobRun.create({
          scheduleId: schedule.id,
          kind: schedule.produce === 'alerts' ? 'alerts' : 'snapshot',
          categoryId,
          isoWeek,
          dueAt: claim.dueAt,
          trigger: claim.trigger,
          params: { asOf: claim.dueAt.toISOString(), then },
          retryOf: null,
          createdBy: `schedule: ${schedule.name}`,
          owner: claim.owner,
          heartbeatAt: claim.now,
        });
        claimed.push(run.id);
        break;
      } catch (err) {
        if (err instanceof UniqueConstraintError) break;
        if (isCertificationConflict(err) && attempt < claimAttempts) continue;
        throw err;
      }
    }
  }
  try {
    await ReportSchedule.update(
      { lastDueAt: claim.dueAt },
      {
        where: {
          id: schedule.id,
          [Op.or]: [{ lastDueAt: null }, { lastDueAt: { [Op.lt]: claim.dueAt } }],
        },
      },
    );
  } catch (err) {
    // Another server recorded the same (or a later) due time at the same moment on another node.
    if (!isCertificationConflict(err)) throw err;
  }
  return claimed;
}

/** Claims queued runs nobody owns yet (run now, retries) with a conditional update, one winner per run. */
export async function claimQueuedRuns(owner: string, now: Date, limit = 20): Promise<number[]> {
  const candidates = await JobRun.findAll({
    where: { status: 'queued', owner: null },
    attributes: ['id'],
    order: [['id', 'ASC']],
    limit,
  });
  const claimed: number[] = [];
  for (const { id } of candidates) {
    let affected = 0;
    try {
      [affected] = await JobRun.update(
        { owner, heartbeatAt: now },
        { where: { id, status: 'queued', owner: null } },
      );
    } catch (err) {
      if (!isCertificationConflict(err)) throw err;
    }
    if (affected === 1) claimed.push(id);
  }
  return claimed;
}

/** Hands back runs this process claimed but never started (it is stopping), for another process to take. */
export async function releaseRuns(ids: number[], owner: string): Promise<void> {
  if (ids.length === 0) return;
  await JobRun.update({ owner: null, heartbeatAt: null }, { where: { id: ids, owner, status: 'queued' } });
}

export type ClaimedRun = {
  id: number;
  kind: JobKind;
  categoryId: number | null;
  isoWeek: string | null;
  dueAt: Date | null;
  params: JobParams;
};

/** Moves a claimed run to running; null when it is not this owner's queued run any more. */
export async function startRun(id: number, owner: string, now: Date): Promise<ClaimedRun | null> {
  const [affected] = await JobRun.update(
    { status: 'running', startedAt: now, heartbeatAt: now },
    { where: { id, owner, status: 'queued' } },
  );
  if (affected !== 1) return null;
  const run = await JobRun.findByPk(id);
  if (!run) return null;
  return {
    id: run.id,
    kind: run.kind,
    categoryId: run.categoryId,
    isoWeek: run.isoWeek,
    dueAt: run.dueAt,
    params: parseJson<JobParams>(run.params, {}),
  };
}

export async function heartbeatRun(id: number, owner: string, now: Date, log: string[]): Promise<void> {
  await JobRun.update({ heartbeatAt: now, log: capLog(log) }, { where: { id, owner, status: 'running' } });
}

export type RunEnd =
  { status: 'succeeded'; rows: number; isoWeek?: string | null } | { status: 'failed'; error: string };

export async function finishRun(
  id: number,
  owner: string,
  startedAt: Date,
  finishedAt: Date,
  log: string[],
  end: RunEnd,
): Promise<void> {
  await JobRun.update(
    {
      status: end.status,
      finishedAt,
      durationMs: Math.max(0, finishedAt.getTime() - startedAt.getTime()),
      heartbeatAt: finishedAt,
      log: capLog(log),
      ...(end.status === 'succeeded'
        ? { rows: end.rows, ...(end.isoWeek ? { isoWeek: end.isoWeek } : {}) }
        : { error: end.error.slice(0, 2000) }),
    },
    { where: { id, owner } },
  );
}

/**
 * Runs whose owner stopped sending heartbeats (the process died mid-run) are marked failed, and a retry is
 * queued for any scheduler to claim. The conditional update lets only one process recover each run.
 */
export async function recoverStaleRuns(staleBefore: Date, recoveredBy: string, now: Date): Promise<number[]> {
  const stale = await JobRun.findAll({
    where: {
      status: ['queued', 'running'],
      owner: { [Op.ne]: null },
      heartbeatAt: { [Op.lt]: staleBefore },
    },
    limit: 50,
  });
  const retries: number[] = [];
  for (const run of stale) {
    const [affected] = await JobRun.update(
      {
        status: 'failed',
        finishedAt: now,
        error: `The app server that owned this run (${run.owner ?? 'unknown'}) stopped sending heartbeats; ${recoveredBy} marked it failed and queued a retry.`,
      },
      {
        where: {
          id: run.id,
          status: ['queued', 'running'],
          heartbeatAt: { [Op.lt]: staleBefore },
        },
      },
    );
    if (affected !== 1) continue;
    const [retry] = await queueRuns([
      {
        kind: run.kind,
        categoryId: run.categoryId,
        scheduleId: run.scheduleId,
        isoWeek: run.isoWeek,
        params: parseJson<JobParams>(run.params, {}),
        trigger: 'retry',
        createdBy: `recovered by ${recoveredBy}`,
        retryOf: run.id,
        attempt: run.attempt + 1,
        now,
      },
    ]);
    if (retry) retries.push(retry.id);
  }
  return retries;
}

/** Queues a new attempt of a failed run with the same kind, category, week and parameters. */
export async function retryJobRun(id: number, actor: Actor, ip?: string): Promise<JobRunRecord> {
  const run = await JobRun.findByPk(id);
  if (!run) throw AppError.notFound('The job run');
  if (run.status !== 'failed') {
    throw new AppError('conflict', `Only failed runs can be retried; this one is ${run.status}.`, 409);
  }
  const existing = await JobRun.findOne({ where: { retryOf: run.id, status: ['queued', 'running'] } });
  if (existing) throw new AppError('conflict', `A retry of this run is already ${existing.status}.`, 409);
  const [retry] = await queueRuns([
    {
      kind: run.kind,
      categoryId: run.categoryId,
      scheduleId: run.scheduleId,
      isoWeek: run.isoWeek,
      params: parseJson<JobParams>(run.params, {}),
      trigger: 'retry',
      createdBy: actor.email,
      retryOf: run.id,
      attempt: run.attempt + 1,
    },
  ]);
  await recordAudit({
    actor,
    action: 'job.retried',
    targetType: 'job_run',
    targetId: run.id,
    details: { retryId: retry!.id, kind: run.kind, categoryId: run.categoryId },
    ip,
  });
  return retry!;
}

/**
 * Queues one backfill run per category (or a single one): past weekly snapshots from imported history,
 * oldest first, with progress in the job history. The scheduler of any app server takes them up.
 */
export async function queueBackfill(
  input: BackfillInput,
  actor: Actor,
  ip?: string,
  now = new Date(),
): Promise<{ runs: JobRunRecord[] }> {
  const lastWeek = lastCompletedIsoWeek(now);
  for (const week of [input.fromWeek, input.toWeek]) {
    if (week && week > lastWeek) {
      throw new AppError(
        'bad_request',
        `${week} has not ended yet; the last week that has is ${lastWeek}.`,
        400,
      );
    }
  }
  const categories =
    input.category === 'all'
      ? await Category.findAll({ attributes: ['id', 'slug'], order: [['name', 'ASC']] })
      : await Category.findAll({ where: { slug: input.category }, attributes: ['id', 'slug'] });
  if (categories.length === 0) {
    throw input.category === 'all'
      ? new AppError('bad_request', 'There is no category to backfill yet.', 400)
      : AppError.notFound('The category');
  }
  const runs = await queueRuns(
    categories.map((c) => ({
      kind: 'backfill' as const,
      categoryId: c.id,
      scheduleId: null,
      isoWeek: null,
      params: {
        ...(input.fromWeek ? { fromWeek: input.fromWeek } : {}),
        toWeek: input.toWeek ?? lastWeek,
        replace: input.replace,
      },
      trigger: 'manual' as const,
      createdBy: actor.email,
      now,
    })),
  );
  await recordAudit({
    actor,
    action: 'job.backfill_queued',
    targetType: 'job_run',
    targetId: runs[0]!.id,
    details: {
      categories: categories.map((c) => c.slug),
      fromWeek: input.fromWeek ?? null,
      toWeek: input.toWeek ?? lastWeek,
      replace: input.replace,
      runIds: runs.map((r) => r.id),
    },
    ip,
  });
  return { runs };
}
