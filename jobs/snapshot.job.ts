import { countOf } from '../shared/plural';
import { AppError } from '../server/lib/app-error';
import { takeSnapshot } from '../server/modules/snapshots/snapshots.service';
import type { JobContext, JobResult } from './job-context';

/** One category's weekly snapshot. A scheduled run whose week is already taken leaves it as it is. */
export async function run(ctx: JobContext): Promise<JobResult> {
  if (ctx.categoryId === null) throw new AppError('bad_request', 'A snapshot run needs a category.', 400);
  try {
    const outcome = await takeSnapshot({
      categoryId: ctx.categoryId,
      ...(ctx.isoWeek ? { isoWeek: ctx.isoWeek } : {}),
      now: ctx.asOf,
      replace: ctx.params.replace ?? false,
      log: ctx.log,
    });
    ctx.log(
      `${outcome.replaced ? 'Replaced' : 'Took'} snapshot ${outcome.snapshotId} of ${outcome.isoWeek}: ${countOf(outcome.rows, 'row')}.`,
    );
    return { rows: outcome.rows, isoWeek: outcome.isoWeek };
  } catch (err) {
    if (err instanceof AppError && err.code === 'conflict' && !ctx.params.replace) {
      ctx.log(`${err.message} Kept the existing snapshot.`);
      return { rows: 0, isoWeek: ctx.isoWeek };
    }
    throw err;
  }
}
