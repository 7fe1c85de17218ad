import {
  calibrate,
  scoreCategory,
  scoreRequest,
  ScoringInputError,
  type ItemInput,
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

/** The alert check's view of a category: the engine's standing of every item as of an instant. */
export interface AlertStateTask {
  kind: 'alert-state';
  items: ItemInput[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

export type AlertItemState = {
  sku: string;
  title: string | null;
  rank: number;
  n: number;
  smoothed: number;
  cluster: boolean | null;
  clusterReason: string | null;
  phrases: { phrase: string; count: number }[];
  stale: boolean | null;
  staleReason: string | null;
  thin: boolean;
};

export function alertState(task: AlertStateTask): AlertItemState[] {
  const result = scoreCategory(task.items, task.settings, { asOf: task.asOf, previous: null });
  return result.items.map((r) => ({
    sku: r.sku,
    title: r.title,
    rank: r.smoothedRank,
    n: r.n,
    smoothed: r.smoothed,
    cluster: r.negativeCluster,
    clusterReason: r.clusterReason,
    phrases: r.recurringPhrases,
    stale: r.stale,
    staleReason: r.staleReason,
    thin: r.thin,
  }));
}

export type WorkerTask = CalibrateTask | ScoreTask | AlertStateTask;

/** An input error crosses the thread boundary as plain data; the service turns it back into a 400. */
export type ScoreOutcome =
  { ok: true; result: ScorePage } | { ok: false; path: string; reason: string; message: string };

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: WorkerTask) {
  switch (task.kind) {
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
    case 'alert-state':
      return alertState(task);
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
