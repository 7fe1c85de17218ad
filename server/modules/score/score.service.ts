import type { Request, Response } from 'express';
import { ZodError } from 'zod';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { readJsonBytes } from '../../lib/json-body';
import { runInWorker, withHeavySlot } from '../../workers/pool';
import type { ScoreOutcome } from '../../workers/tasks';
import type { JsonBodyFailure } from '../../workers/json-body';

/** Turns a body failure reported by a worker into the error express.json and the registry would raise. */
function bodyError(failure: JsonBodyFailure): Error {
  if (failure.kind === 'json')
    // toErrorResponse answers this as it answers express.json's own syntax errors.
    return Object.assign(new SyntaxError('The request body is not valid JSON.'), { status: 400 });
  return new ZodError(failure.issues as ConstructorParameters<typeof ZodError>[0]);
}

/**
 * Scores the items of a POST /api/score body with the shared engine in a worker thread: the caller's heavy
 * slot and a place in the pool are taken first, then the body is read as bytes (at most 10 MB) and the
 * worker parses, checks (scoreRequestSchema), scores and serialises one page of at most SCORE_PAGE_MAX
 * items, so a 200,000-item request never holds the event loop. Answers the JSON bytes of that page.
 */
export async function scoreItems(
  actor: Actor,
  req: Request,
  res: Response,
  now: Date = new Date(),
): Promise<Uint8Array> {
  const outcome = await withHeavySlot(actor, () =>
    runInWorker<ScoreOutcome>(async () => ({
      kind: 'score',
      body: await readJsonBytes(req, res),
      now: now.toISOString(),
    })),
  );
  if (outcome instanceof Uint8Array) return outcome;
  if (outcome.kind === 'scoring')
    throw new AppError('validation_failed', outcome.message, 400, [
      { path: outcome.path, message: outcome.reason },
    ]);
  throw bodyError(outcome);
}
