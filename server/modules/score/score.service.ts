import type { ScoreRequest } from '../../../shared/schemas/score.schema';
import { scoreRequest, ScoringInputError, type ScoreResult } from '../../../shared/scoring';
import { AppError } from '../../lib/app-error';

/** Scores items sent by a caller with the shared engine; an invalid input is a 400 naming the field. */
export function scoreItems(request: ScoreRequest, now: Date = new Date()): ScoreResult {
  try {
    return scoreRequest(request, now);
  } catch (err) {
    if (err instanceof ScoringInputError) {
      throw new AppError('validation_failed', err.message, 400, [{ path: err.path, message: err.reason }]);
    }
    throw err;
  }
}
