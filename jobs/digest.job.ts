import { AppError } from '../server/lib/app-error';
import { produceDigests, scheduleOfRun } from '../server/modules/digests/digests.service';
import type { JobContext, JobResult } from './job-context';

/**
 * The digest step after a category's snapshot: renders and stores the category's PDF, queues its mail to
 * the subscribers and the schedule's extra recipients, and, once every category of the schedule has its
 * snapshot of the week, the portfolio digest for executives. Safe to run twice: PDFs are replaced and
 * nobody is mailed twice for one digest.
 */
export async function run(ctx: JobContext): Promise<JobResult> {
  if (!ctx.isoWeek)
    throw new AppError('bad_request', 'A digest run needs the ISO week of its snapshot.', 400);
  const scheduleId = await scheduleOfRun(ctx.runId);
  const result = await produceDigests({
    isoWeek: ctx.isoWeek,
    categoryIds: ctx.categoryId === null ? null : [ctx.categoryId],
    scheduleId,
    portfolio: 'auto',
    now: new Date(),
    log: ctx.log,
  });
  for (const line of result.skipped) ctx.log(`Skipped ${line}.`);
  return { rows: result.digests.length, isoWeek: ctx.isoWeek };
}
