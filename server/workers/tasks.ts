import { Tinypool } from 'tinypool';
import {
  calibrate,
  scoreRequest,
  ScoringInputError,
  type ItemInput,
  type ScoringSettings,
} from '../../shared/scoring';
import { SCORE_PAGE_MAX, scoreRequestSchema, type ScoreRequest } from '../../shared/schemas/score.schema';
import { parseJsonBytes, type JsonBodyFailure } from './json-body';

export interface CalibrateTask {
  kind: 'calibrate';
  items: ItemInput[];
  observed: string[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

export interface ScoreTask {
  kind: 'score';
  /** The request body as it arrived (null: none); parsed and checked here, off the event loop. */
  body: Uint8Array | null;
  /** The caller's clock reading, so a worker never decides "now" itself. */
  now: string;
}

export type ScorePage = ReturnType<typeof scoreRequest> & {
  page: { offset: number; limit: number; total: number };
};

/**
 * Only the asked-for page leaves the worker, so the event loop never holds 200,000 item results; the
 * command line uses the same rule, so it prints the same JSON as the API.
 */
export function scorePage(request: ScoreRequest, now: Date): ScorePage {
  const result = scoreRequest(request, now);
  const offset = request.offset ?? 0;
  const limit = request.limit ?? SCORE_PAGE_MAX;
  return {
    ...result,
    items: result.items.slice(offset, offset + limit),
    page: { offset, limit, total: result.items.length },
  };
}

export type WorkerTask = CalibrateTask | ScoreTask;

/**
 * The answer's JSON as bytes moved (not copied) to the event loop, which sends them as they are; an input
 * error crosses the thread boundary as plain data and the service turns it back into a 400.
 */
export type ScoreOutcome =
  | Uint8Array
  | JsonBodyFailure
  | { ok: false; kind: 'scoring'; path: string; reason: string; message: string };

function scoreBody(task: ScoreTask): ScoreOutcome {
  const read = parseJsonBytes(scoreRequestSchema, task.body);
  if (!read.ok) return read;
  try {
    const page = scorePage(read.value, new Date(task.now));
    return Tinypool.move(new TextEncoder().encode(JSON.stringify(page))) as Uint8Array;
  } catch (err) {
    if (err instanceof ScoringInputError)
      return { ok: false, kind: 'scoring', path: err.path, reason: err.reason, message: err.message };
    throw err;
  }
}

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: WorkerTask) {
  switch (task.kind) {
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
    case 'score':
      return scoreBody(task);
  }
}
