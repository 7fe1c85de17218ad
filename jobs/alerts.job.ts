import { AppError } from '../server/lib/app-error';
import { checkCategory } from '../server/modules/alerts/alert-check.service';
import { flushAlertMail } from '../server/modules/alerts/alert-mail.service';
import { countOf } from '../shared/plural';
import type { JobContext, JobResult } from './job-context';

/**
 * The daily alert check of one category, as of the run's due time (the scheduler's clock): catches what
 * time alone changes (an item going stale) and anything an import or snapshot check missed.
 */
export async function run(ctx: JobContext): Promise<JobResult> {
  if (ctx.categoryId === null) throw new AppError('bad_request', 'An alert check needs a category.', 400);
  const outcome = await checkCategory(ctx.categoryId, { source: 'daily' }, ctx.asOf);
  ctx.log(
    `Compared with the ${outcome.baseline}: ${countOf(outcome.raised, 'new alert')} for ${outcome.isoWeek}.`,
  );
  if (outcome.raised > 0) {
    const mail = await flushAlertMail(ctx.asOf);
    ctx.log(`${countOf(mail.mails, 'alert mail')} queued.`);
  }
  return { rows: outcome.raised, isoWeek: outcome.isoWeek };
}
