import { z } from 'zod';
import { isIsoWeekLabel } from '../iso-week';
import { isoWeekSchema } from './iso-week.schema';

export const jobKinds = ['snapshot', 'backfill', 'digest', 'alerts'] as const;
export type JobKind = (typeof jobKinds)[number];
export const jobStatuses = ['queued', 'running', 'succeeded', 'failed'] as const;
export type JobStatus = (typeof jobStatuses)[number];
export const jobTriggers = ['schedule', 'catch_up', 'manual', 'retry'] as const;
export type JobTrigger = (typeof jobTriggers)[number];

export const jobTriggerLabels: Record<JobTrigger, string> = {
  schedule: 'On schedule',
  catch_up: 'Catch-up after downtime',
  manual: 'Run by hand',
  retry: 'Retry',
};

/** What a run was asked to do beyond its kind and category. */
export const jobParamsSchema = z.object({
  replace: z.boolean().optional(),
  /** The instant the run computes as of: a scheduled run's due time, so a retry takes the same week. */
  asOf: z.string().optional(),
  fromWeek: z.string().optional(),
  toWeek: z.string().optional(),
  /** Steps after the main one, in order ('digest' for snapshot + digest schedules). */
  then: z.array(z.enum(jobKinds)).optional(),
});
export type JobParams = z.infer<typeof jobParamsSchema>;

export const jobRunSchema = z.object({
  id: z.number().int(),
  scheduleId: z.number().int().nullable(),
  scheduleName: z.string().nullable(),
  kind: z.enum(jobKinds),
  categoryId: z.number().int().nullable(),
  categoryName: z.string().nullable(),
  isoWeek: z.string().nullable(),
  dueAt: z.string().nullable(),
  status: z.enum(jobStatuses),
  trigger: z.enum(jobTriggers),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
  durationMs: z.number().int().nullable(),
  rows: z.number().int().nullable(),
  error: z.string().nullable(),
  attempt: z.number().int(),
  retryOf: z.number().int().nullable(),
  createdBy: z.string().nullable(),
  owner: z.string().nullable(),
  createdAt: z.string(),
});
export type JobRunRecord = z.infer<typeof jobRunSchema>;

export const jobRunDetailSchema = jobRunSchema.extend({
  log: z.array(z.string()),
  params: jobParamsSchema,
  heartbeatAt: z.string().nullable(),
});
export type JobRunDetail = z.infer<typeof jobRunDetailSchema>;

const isoWeek = isoWeekSchema.refine(
  isIsoWeekLabel,
  'Use an ISO week such as 2026-W48 (week 53 only in years that have one).',
);

/** Past weekly snapshots to compute from imported history, for one category or all of them. */
export const backfillInputSchema = z
  .object({
    /** A category's slug, or "all". */
    category: z.string().min(1).max(64),
    /** The first week; empty means the category's first week with data. */
    fromWeek: isoWeek.optional(),
    /** The last week; empty means the last week that has ended. */
    toWeek: isoWeek.optional(),
    /** Recompute weeks that already have a snapshot instead of keeping them. */
    replace: z.boolean().default(false),
  })
  .refine((b) => !b.fromWeek || !b.toWeek || b.fromWeek <= b.toWeek, {
    message: 'The first week must not come after the last one.',
    path: ['toWeek'],
  });
export type BackfillInput = z.output<typeof backfillInputSchema>;
/** What the backfill form holds before validation (replace may be left out). */
export type BackfillFormValues = z.input<typeof backfillInputSchema>;

export const jobListQuerySchema = z.object({
  status: z.enum(jobStatuses).optional(),
  category: z.coerce.number().int().positive().optional(),
  schedule: z.coerce.number().int().positive().optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
export type JobListQuery = z.infer<typeof jobListQuerySchema>;

export const jobListSchema = z.object({
  items: z.array(jobRunSchema),
  total: z.number().int(),
  /** Queued or running anywhere, whatever the filter: the screen polls while this is above zero. */
  active: z.number().int(),
});
export type JobList = z.infer<typeof jobListSchema>;
