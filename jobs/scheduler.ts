import { hostname } from 'node:os';
import { randomBytes } from 'node:crypto';
import { setTimeout as sleep } from 'node:timers/promises';
import { countOf } from '../shared/plural';
import { parseInstant } from '../shared/clock';
import { latestDue } from '../shared/schemas/schedules.schema';
import { jobEvents } from '../server/modules/jobs/job-events';
import {
  claimDueRuns,
  claimQueuedRuns,
  finishRun,
  heartbeatRun,
  recoverStaleRuns,
  releaseRuns,
  startRun,
} from '../server/modules/jobs/jobs.service';
import { activeSchedules, type ActiveSchedule } from '../server/modules/schedules/schedules.service';
import type { JobContext, JobKinds } from './job-context';

export type CronHandle = { stop: () => void | Promise<void> };
/** Calls `onTick` at each occurrence of a cron expression in a time zone (node-cron, in jobs/index.ts). */
export type CronDriver = (expression: string, timeZone: string, onTick: () => void) => CronHandle;

export type SchedulerOptions = {
  kinds: JobKinds;
  cron: CronDriver;
  /** The clock; tests inject one instead of waiting real minutes. */
  now?: () => Date;
  /** Names this scheduler in job_runs.owner; unique per process (and per instance). */
  owner?: string;
  log?: (line: string) => void;
  /** Lines a run logs, as they happen (the command line prints them). */
  onRunLog?: (runId: number, line: string) => void;
  reloadEveryMs?: number;
  pollEveryMs?: number;
  heartbeatEveryMs?: number;
  /** A claimed run whose heartbeat is older than this is taken to belong to a dead process. */
  staleAfterMs?: number;
  /** The periodic check treats a due time as missed once it is this old and still unclaimed. */
  lateAfterMs?: number;
};

export type RunOutcome = 'succeeded' | 'failed' | 'skipped';

function stamp(date: Date): string {
  return date.toISOString().slice(11, 19);
}

function message(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}

/**
 * Drives the report schedules of one app server. Every due occurrence is claimed through the database
 * (see claimDueRuns), so any number of app servers can run a scheduler on one database and each run
 * still happens once. Runs execute one at a time in this process.
 */
export class Scheduler {
  readonly owner: string;
  private readonly now: () => Date;
  private readonly log: (line: string) => void;
  private readonly tasks = new Map<
    number,
    { signature: string; schedule: ActiveSchedule; handle: CronHandle }
  >();
  private readonly timers: NodeJS.Timeout[] = [];
  private readonly pending: number[] = [];
  private pumping: Promise<void> | null = null;
  private current: Promise<RunOutcome> | null = null;
  private accepting = false;
  private readonly inflight = new Set<Promise<void>>();
  private readonly onSchedulesChanged = (): void => void this.guarded('reload', () => this.reload());
  private readonly onRunsQueued = (): void => void this.guarded('poll', () => this.pollQueue());

  constructor(private readonly options: SchedulerOptions) {
    this.now = options.now ?? (() => new Date());
    this.owner = options.owner ?? `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`;
    this.log = options.log ?? (() => {});
  }

  /** Loads the schedules, catches up on a missed due time, then follows cron ticks and the periodic checks. */
  async start(): Promise<void> {
    this.accepting = true;
    await this.reload();
    const caughtUp = await this.catchUp();
    if (caughtUp.length > 0)
      this.log(`Catching up: ${countOf(caughtUp.length, 'run')} missed while stopped.`);
    await this.pollQueue();
    const every = (ms: number, name: string, fn: () => Promise<unknown>): void => {
      const timer = setInterval(() => void this.guarded(name, fn), ms);
      timer.unref();
      this.timers.push(timer);
    };
    every(this.options.reloadEveryMs ?? 60_000, 'reload', async () => {
      await this.reload();
      await this.catchUp({ minAgeMs: this.options.lateAfterMs ?? 90_000 });
    });
    every(this.options.pollEveryMs ?? 5_000, 'poll', () => this.pollQueue());
    jobEvents.on('schedules-changed', this.onSchedulesChanged);
    jobEvents.on('runs-queued', this.onRunsQueued);
  }

  get scheduleCount(): number {
    return this.tasks.size;
  }

  /** Follows the enabled schedules in the database: new ones start ticking, changed ones restart, gone ones stop. */
  async reload(): Promise<void> {
    if (!this.accepting) return;
    const schedules = await activeSchedules();
    const seen = new Set<number>();
    for (const schedule of schedules) {
      seen.add(schedule.id);
      const signature = `${schedule.cron}|${schedule.timeZone}`;
      const existing = this.tasks.get(schedule.id);
      if (existing?.signature === signature) {
        existing.schedule = schedule;
        continue;
      }
      await existing?.handle.stop();
      const handle = this.options.cron(schedule.cron, schedule.timeZone, () => {
        void this.guarded(`tick of schedule ${schedule.id}`, () => this.fire(schedule.id));
      });
      this.tasks.set(schedule.id, { signature, schedule, handle });
    }
    for (const [id, task] of this.tasks) {
      if (!seen.has(id)) {
        await task.handle.stop();
        this.tasks.delete(id);
      }
    }
  }

  /** A cron tick: claim the occurrence that is due now. */
  async fire(scheduleId: number): Promise<number[]> {
    const task = this.tasks.get(scheduleId);
    if (!this.accepting || !task) return [];
    const now = this.now();
    const dueAt = latestDue(task.schedule.cron, task.schedule.timeZone, now);
    const ids = await claimDueRuns({ scheduleId, dueAt, trigger: 'schedule', owner: this.owner, now });
    this.enqueue(ids);
    return ids;
  }

  /**
   * A schedule whose latest due time is newer than the last one claimed missed it while no scheduler was
   * running: it runs once for that latest occurrence, however many occurrences were missed.
   */
  async catchUp(options: { minAgeMs?: number } = {}): Promise<number[]> {
    if (!this.accepting) return [];
    const now = this.now();
    const claimed: number[] = [];
    for (const schedule of await activeSchedules()) {
      const dueAt = latestDue(schedule.cron, schedule.timeZone, now);
      const since = schedule.lastDueAt ?? schedule.createdAt;
      if (dueAt.getTime() <= since.getTime()) continue;
      if (options.minAgeMs !== undefined && now.getTime() - dueAt.getTime() < options.minAgeMs) continue;
      const ids = await claimDueRuns({
        scheduleId: schedule.id,
        dueAt,
        trigger: 'catch_up',
        owner: this.owner,
        now,
      });
      if (ids.length > 0)
        this.log(`Schedule ${schedule.id} missed ${dueAt.toISOString()}; running it once now.`);
      claimed.push(...ids);
    }
    this.enqueue(claimed);
    return claimed;
  }

  /** Takes queued runs nobody owns (run now, retries) and recovers runs of app servers that died. */
  async pollQueue(): Promise<number[]> {
    if (!this.accepting) return [];
    const now = this.now();
    const staleBefore = new Date(now.getTime() - (this.options.staleAfterMs ?? 120_000));
    const retries = await recoverStaleRuns(staleBefore, this.owner, now);
    if (retries.length > 0)
      this.log(`Recovered ${countOf(retries.length, 'run')} left by a stopped app server.`);
    const ids = await claimQueuedRuns(this.owner, now);
    this.enqueue(ids);
    return ids;
  }

  private enqueue(ids: number[]): void {
    if (ids.length === 0) return;
    this.pending.push(...ids);
    if (!this.pumping) {
      this.pumping = this.pump().finally(() => {
        this.pumping = null;
      });
    }
  }

  private async pump(): Promise<void> {
    while (this.accepting && this.pending.length > 0) {
      const id = this.pending.shift()!;
      this.current = this.execute(id);
      await this.current;
      this.current = null;
    }
  }

  /** Runs one claimed run: its main step, then any later steps (the digest of a snapshot + digest schedule). */
  async execute(id: number): Promise<RunOutcome> {
    const startedAt = this.now();
    const run = await startRun(id, this.owner, startedAt);
    if (!run) return 'skipped';
    const lines: string[] = [];
    const log = (line: string): void => {
      lines.push(`${stamp(this.now())} ${line}`);
      this.options.onRunLog?.(id, line);
    };
    let lastShare = -1;
    const progress = (done: number, total: number): void => {
      const share = total === 0 ? 100 : Math.floor((done / total) * 20) * 5;
      if (share !== lastShare || done === total) log(`Progress: ${done} of ${total}.`);
      lastShare = share;
    };
    const heartbeat = setInterval(() => {
      heartbeatRun(id, this.owner, this.now(), lines).catch((err: unknown) => {
        this.log(`Heartbeat of run ${id} failed: ${message(err)}`);
      });
    }, this.options.heartbeatEveryMs ?? 10_000);
    heartbeat.unref();
    const steps = [run.kind, ...(run.params.then ?? [])];
    log(`Started on ${this.owner}: ${steps.join(' → ')}${run.isoWeek ? ` for ${run.isoWeek}` : ''}.`);
    try {
      let rows = 0;
      let isoWeek = run.isoWeek;
      for (const [index, step] of steps.entries()) {
        const runner = this.options.kinds[step];
        if (!runner) {
          if (index === 0) throw new Error(`This app server has no job definition for "${step}".`);
          log(`This app server has no job definition for the step "${step}"; skipped.`);
          continue;
        }
        const ctx: JobContext = {
          runId: id,
          categoryId: run.categoryId,
          isoWeek,
          asOf: (run.params.asOf ? parseInstant(run.params.asOf) : null) ?? run.dueAt ?? startedAt,
          params: run.params,
          log,
          progress,
        };
        const result = await runner(ctx);
        // The run's rows and week are those of its main step; later steps report in the log.
        if (index === 0) {
          rows = result.rows;
          isoWeek = result.isoWeek ?? isoWeek;
        }
      }
      const finishedAt = this.now();
      log(`Succeeded in ${finishedAt.getTime() - startedAt.getTime()} ms.`);
      await finishRun(id, this.owner, startedAt, finishedAt, lines, { status: 'succeeded', rows, isoWeek });
      return 'succeeded';
    } catch (err) {
      log(`Failed: ${message(err)}`);
      await finishRun(id, this.owner, startedAt, this.now(), lines, {
        status: 'failed',
        error: message(err),
      });
      return 'failed';
    } finally {
      clearInterval(heartbeat);
    }
  }

  /** Resolves when the checks under way have finished and every run they claimed has finished too. */
  async idle(): Promise<void> {
    while (this.inflight.size > 0 || this.pumping) {
      await Promise.all([...this.inflight]);
      if (this.pumping) await this.pumping;
    }
  }

  /**
   * Stops taking work: no more ticks or checks, claimed runs that have not started go back to the queue
   * for another app server, and the running one gets `timeoutMs` to finish. Returns whether it did.
   */
  async stop(timeoutMs = 30_000): Promise<{ finished: boolean }> {
    this.accepting = false;
    jobEvents.off('schedules-changed', this.onSchedulesChanged);
    jobEvents.off('runs-queued', this.onRunsQueued);
    for (const timer of this.timers.splice(0)) clearInterval(timer);
    for (const task of this.tasks.values()) await task.handle.stop();
    this.tasks.clear();
    // Checks already under way may still claim runs; let them land in `pending`, then hand those back.
    await Promise.all([...this.inflight]);
    await releaseRuns(this.pending.splice(0), this.owner);
    if (!this.current) return { finished: true };
    const finished = await Promise.race([
      this.current.then(() => true),
      sleep(timeoutMs, false, { ref: false }),
    ]);
    return { finished };
  }

  private guarded(what: string, fn: () => Promise<unknown>): Promise<void> {
    const work = fn()
      .then(() => undefined)
      .catch((err: unknown) => this.log(`Scheduler ${what} failed: ${message(err)}`))
      .finally(() => this.inflight.delete(work));
    this.inflight.add(work);
    return work;
  }
}
