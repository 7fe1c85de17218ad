import type { ScoreRequest } from '../../../shared/schemas/score.schema';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { runInWorker, withHeavySlot } from '../../workers/pool';
import type { ScoreOutcome, ScorePage } from '../../workers/tasks';

/**
 * Scores items sent by a caller with the shared engine in a worker thread, so a 200,000-item request
 * never holds the event loop, and answers one page of at most SCORE_PAGE_MAX items (offset/limit);
 * an invalid input is a 400 naming the field.
 */
export async function scoreItems(
  actor: Actor,
  request: ScoreRequest,
  now: Date = new Date(),
): Promise<ScorePage> {
  const outcome = await withHeavySlot(actor, () =>
    runInWorker<ScoreOutcome>({ kind: 'score', request, now: now.toISOString() }),
  );
  if (!outcome.ok)
    throw new AppError('validation_failed', outcome.message, 400, [
      { path: outcome.path, message: outcome.reason },
    ]);
  return outcome.result;
}
