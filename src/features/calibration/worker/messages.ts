import type { CalibrationResult, ItemInput, ScoringSettings } from '../../../../shared/scoring';

export interface CalibrationRequestMessage {
  items: ItemInput[];
  observed: string[];
  settings: Partial<ScoringSettings>;
  asOf: string;
  unexplainedCount: number;
}

export type CalibrationWorkerMessage =
  | { kind: 'progress'; share: number }
  | { kind: 'done'; result: CalibrationResult }
  | { kind: 'failed'; message: string };
