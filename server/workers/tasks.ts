import {
  calibrate,
  scoreRequest,
  ScoringInputError,
  type ItemInput,
  type ScoringSettings,
} from '../../shared/scoring';
import type { ScoreRequest } from '../../shared/schemas/score.schema';

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

export type WorkerTask = CalibrateTask | ScoreTask;

/** An input error crosses the thread boundary as plain data; the service turns it back into a 400. */
export type ScoreOutcome =
  | { ok: true; result: ReturnType<typeof scoreRequest> }
  | { ok: false; path: string; reason: string; message: string };

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: WorkerTask) {
  switch (task.kind) {
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
    case 'score':
      try {
        return { ok: true, result: scoreRequest(task.request, new Date(task.now)) } satisfies ScoreOutcome;
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
