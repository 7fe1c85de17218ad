import {
  calibrate,
  scoreRequest,
  scoreWithRankIntervals,
  ScoringInputError,
  type ItemInput,
  type PreviousRankingEntry,
  type RankIntervalOptions,
  type RankIntervalResult,
  type ScoreResult,
  type ScoringSettings,
} from '../../shared/scoring';
import { SCORE_PAGE_MAX, type ScoreRequest } from '../../shared/schemas/score.schema';

export interface CalibrateTask {
  kind: 'calibrate';
  items: ItemInput[];
  observed: string[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

export interface ScoreTask {
  kind: 'score';
  request: ScoreRequest;
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

/** A snapshot's scoring and rank sampling, off the event loop that runs the scheduler and the API. */
export interface SnapshotScoreTask {
  kind: 'snapshot-score';
  items: ItemInput[];
  settings: Partial<ScoringSettings>;
  asOf: string;
  previous: PreviousRankingEntry[] | null;
  ranks: RankIntervalOptions;
}

export type SnapshotScore = { result: ScoreResult; intervals: RankIntervalResult };

export type WorkerTask = CalibrateTask | ScoreTask | SnapshotScoreTask;

/** An input error crosses the thread boundary as plain data; the service turns it back into a 400. */
export type ScoreOutcome =
  { ok: true; result: ScorePage } | { ok: false; path: string; reason: string; message: string };

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: WorkerTask) {
  switch (task.kind) {
    case 'snapshot-score':
      return scoreWithRankIntervals(
        task.items,
        task.settings,
        { asOf: task.asOf, previous: task.previous },
        task.ranks,
      ) satisfies SnapshotScore;
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
    case 'score':
      try {
        return { ok: true, result: scorePage(task.request, new Date(task.now)) } satisfies ScoreOutcome;
      } catch (err) {
        if (err instanceof ScoringInputError)
          return {
            ok: false,
            path: err.path,
            reason: err.reason,
            message: err.message,
          } satisfies ScoreOutcome;
        throw err;
      }
  }
}
