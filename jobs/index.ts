import cron from 'node-cron';
import * as alertsJob from './alerts.job';
import * as backfillJob from './backfill.job';
import * as digestJob from './digest.job';
import type { JobKinds } from './job-context';
import { Scheduler, type CronDriver, type SchedulerOptions } from './scheduler';
import * as snapshotJob from './snapshot.job';

/** The job definitions of Ballast by kind. */
export const jobKinds: JobKinds = {
  snapshot: snapshotJob.run,
  backfill: backfillJob.run,
  digest: digestJob.run,
  alerts: alertsJob.run,
};

/** The one place Ballast calls cron.schedule: each schedule ticks in its own IANA time zone. */
export const nodeCronDriver: CronDriver = (expression, timeZone, onTick) =>
  cron.schedule(expression, () => onTick(), { timezone: timeZone });

export function createScheduler(options: Partial<SchedulerOptions> = {}): Scheduler {
  return new Scheduler({ kinds: jobKinds, cron: nodeCronDriver, ...options });
}

export async function startScheduler(options: Partial<SchedulerOptions> = {}): Promise<Scheduler> {
  const scheduler = createScheduler(options);
  await scheduler.start();
  return scheduler;
}
