import { countOf } from '../shared/plural';
import { AppError } from '../server/lib/app-error';
import { backfillSnapshots } from '../server/modules/snapshots/snapshots.service';
import type { JobContext, JobResult } from './job-context';

/** The weekly snapshots of past weeks of one category, oldest first, with progress. */
export async function run(ctx: JobContext): Promise<JobResult> {
  if (ctx.categoryId === null) throw new AppError('bad_request', 'A backfill run needs a category.', 400);
  const outcomes = await backfillSnapshots({
    categoryId: ctx.categoryId,
    ...(ctx.params.fromWeek ? { fromWeek: ctx.params.fromWeek } : {}),
    ...(ctx.params.toWeek ? { toWeek: ctx.params.toWeek } : {}),
    replace: ctx.params.replace ?? false,
    log: ctx.log,
    onProgress: ctx.progress,
  });
  ctx.log(`Backfill wrote ${countOf(outcomes.length, 'weekly snapshot')}.`);
  return {
    rows: outcomes.reduce((sum, o) => sum + o.rows, 0),
    isoWeek: outcomes.at(-1)?.isoWeek ?? null,
  };
}
