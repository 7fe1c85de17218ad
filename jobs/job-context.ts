import type { JobKind, JobParams } from '../shared/schemas/jobs.schema';

/** What a job definition is given: the run's target, the instant it computes as of, and where to report. */
export type JobContext = {
  runId: number;
  categoryId: number | null;
  isoWeek: string | null;
  /** The due time for scheduled runs (so retries and catch-ups compute the same week), else the start. */
  asOf: Date;
  params: JobParams;
  log: (line: string) => void;
  progress: (done: number, total: number) => void;
};

export type JobResult = { rows: number; isoWeek?: string | null };

export type JobRunner = (ctx: JobContext) => Promise<JobResult>;

export type JobKinds = Partial<Record<JobKind, JobRunner>>;
