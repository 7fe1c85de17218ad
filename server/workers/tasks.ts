import { calibrate, type ItemInput, type ScoringSettings } from '../../shared/scoring';

export interface CalibrateTask {
  kind: 'calibrate';
  items: ItemInput[];
  observed: string[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: CalibrateTask) {
  switch (task.kind) {
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
  }
}
