import { CronExpressionParser } from 'cron-parser';
import cronstrue from 'cronstrue';
import { z } from 'zod';
import { isoDateSchema } from './score.schema';

export const produceKinds = ['snapshot', 'snapshot_digest', 'alerts'] as const;
export type ProduceKind = (typeof produceKinds)[number];
export const produceLabels: Record<ProduceKind, string> = {
  snapshot: 'Snapshot only',
  snapshot_digest: 'Snapshot + digest',
  alerts: 'Alert check',
};

const fieldNames = ['minute', 'hour', 'day of month', 'month', 'day of week'] as const;
const fieldRanges = ['0–59', '0–23', '1–31', '1–12 or JAN–DEC', '0–7 or SUN–SAT'] as const;

/**
 * Why a five-field cron expression cannot be used, in words a person can act on; null when it is fine.
 * cron-parser is the rule: what it accepts is what the scheduler computes due times with.
 */
export function cronProblem(expression: string): string | null {
  const fields = expression.trim().split(/\s+/).filter(Boolean);
  if (fields.length !== 5) {
    return `A cron expression has five fields (minute hour day-of-month month day-of-week); this one has ${fields.length}.`;
  }
  for (const [i, field] of fields.entries()) {
    if (!/^[0-9A-Za-z*,/-]+$/.test(field)) {
      return `The ${fieldNames[i]} field "${field}" uses characters Ballast does not accept; use numbers, names, * , - and /.`;
    }
    try {
      const probe = fields.map((f, j) => (j === i ? f : '*')).join(' ');
      CronExpressionParser.parse(probe);
    } catch (error) {
      const reason = error instanceof Error ? error.message : String(error);
      const value = /got value (\S+)/.exec(reason)?.[1];
      if (value)
        return `The ${fieldNames[i]} field allows ${fieldRanges[i]}; "${value}" is outside that range.`;
      return `The ${fieldNames[i]} field "${field}" is not valid (${reason}).`;
    }
  }
  try {
    CronExpressionParser.parse(fields.join(' '));
  } catch (error) {
    return `This cron expression can never run: ${error instanceof Error ? error.message : String(error)}.`;
  }
  return null;
}

export function isTimeZone(name: string): boolean {
  if (!/^[A-Za-z_]+(\/[A-Za-z0-9_+-]+)*$/.test(name)) return false;
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

/** The instant as an ISO 8601 string with the UTC offset that applies in the zone at that instant. */
export function isoInZone(date: Date, timeZone: string): string {
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-GB', {
      timeZone,
      year: 'numeric',
      month: '2-digit',
      day: '2-digit',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
      timeZoneName: 'longOffset',
    })
      .formatToParts(date)
      .map((p) => [p.type, p.value]),
  ) as Record<string, string>;
  const offset = parts.timeZoneName === 'GMT' ? '+00:00' : (parts.timeZoneName ?? 'GMT+00:00').slice(3);
  return `${parts.year}-${parts.month}-${parts.day}T${parts.hour}:${parts.minute}:${parts.second}${offset}`;
}

/** The next `count` run times after `from`, computed in the schedule's zone (daylight-saving changes included). */
export function nextRuns(cron: string, timeZone: string, from: Date, count = 5): Date[] {
  const it = CronExpressionParser.parse(cron.trim(), { tz: timeZone, currentDate: from });
  return Array.from({ length: count }, () => it.next().toDate());
}

/** The latest run time at or before `at` (a second of slack so a tick that fires a hair early still counts). */
export function latestDue(cron: string, timeZone: string, at: Date): Date {
  const it = CronExpressionParser.parse(cron.trim(), {
    tz: timeZone,
    currentDate: new Date(at.getTime() + 1000),
  });
  return it.prev().toDate();
}

export function describeCron(cron: string): string {
  try {
    return cronstrue.toString(cron.trim(), { use24HourTimeFormat: true, verbose: false });
  } catch {
    return '';
  }
}

const cronField = z
  .string()
  .trim()
  .min(1, 'Enter a cron expression, for example "0 6 * * 1" (Mondays at 06:00).')
  .max(120)
  .superRefine((value, ctx) => {
    const problem = cronProblem(value);
    if (problem) ctx.addIssue({ code: 'custom', message: problem });
  })
  .transform((v) => v.split(/\s+/).join(' '));

const timeZoneField = z
  .string()
  .trim()
  .min(1, 'Choose a time zone.')
  .max(64)
  .refine(isTimeZone, 'Use an IANA time zone name such as Europe/London or America/New_York.');

const scheduleFields = z.object({
  name: z.string().trim().min(1, 'Give the schedule a name.').max(120, 'Use at most 120 characters.'),
  cron: cronField,
  timeZone: timeZoneField,
  /** null means every category, including ones added later. */
  categoryIds: z
    .array(z.number().int().positive())
    .min(1, 'Pick at least one category, or choose all categories.')
    .max(200)
    .nullable(),
  recipients: z
    .array(
      z
        .string()
        .trim()
        .toLowerCase()
        .email({ error: (iss) => `${String(iss.input)} is not a valid e-mail address.` })
        .max(254),
    )
    .max(50, 'Use at most 50 extra recipients.'),
  produce: z.enum(produceKinds),
  enabled: z.boolean(),
});

export const scheduleInputSchema = scheduleFields.extend({
  recipients: scheduleFields.shape.recipients.default([]),
  enabled: scheduleFields.shape.enabled.default(true),
});
export type ScheduleInput = z.input<typeof scheduleInputSchema>;
export type ScheduleValues = z.output<typeof scheduleInputSchema>;

// Built from the fields without their defaults: zod applies a default even inside .partial(), so a pause
// ({ enabled: false }) would otherwise also send recipients: [] and an edit without `enabled` would resume.
export const scheduleUpdateSchema = scheduleFields
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');
export type ScheduleUpdate = z.output<typeof scheduleUpdateSchema>;

export const schedulePreviewQuerySchema = z.object({
  cron: cronField,
  tz: timeZoneField,
  /** Count the next runs from this instant instead of now. */
  from: isoDateSchema.optional(),
});

export const schedulePreviewSchema = z.object({
  cron: z.string(),
  timeZone: z.string(),
  description: z.string(),
  nextRuns: z.array(z.string()),
});
export type SchedulePreview = z.infer<typeof schedulePreviewSchema>;

export const scheduleSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  cron: z.string(),
  timeZone: z.string(),
  description: z.string(),
  categoryIds: z.array(z.number().int()).nullable(),
  recipients: z.array(z.string()),
  produce: z.enum(produceKinds),
  enabled: z.boolean(),
  nextRunAt: z.string().nullable(),
  lastDueAt: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type ScheduleRecord = z.infer<typeof scheduleSchema>;

export const runNowSchema = z.object({
  /** Take the week's snapshot again even if it exists (the old one is replaced, and the log says so). */
  replace: z.boolean().default(false),
});
