import cron from 'node-cron';
import { lastCompletedIsoWeek } from '../../../shared/iso-week';
import type { JobRunRecord } from '../../../shared/schemas/jobs.schema';
import {
  describeCron,
  isoInZone,
  latestDue,
  nextRuns,
  type ScheduleRecord,
  type SchedulePreview,
  type ScheduleUpdate,
  type ScheduleValues,
} from '../../../shared/schemas/schedules.schema';
import { ReportSchedule } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { jobEvents } from '../jobs/job-events';
import { categoriesFor, queueRuns } from '../jobs/jobs.service';

function jsonValue<T>(value: unknown, fallback: T): T {
  if (value === null || value === undefined) return fallback;
  if (typeof value === 'string') return JSON.parse(value) as T;
  return value as T;
}

function toRecord(row: ReportSchedule, now: Date): ScheduleRecord {
  const next = row.enabled ? nextRuns(row.cron, row.timeZone, now, 1)[0] : undefined;
  return {
    id: row.id,
    name: row.name,
    cron: row.cron,
    timeZone: row.timeZone,
    description: describeCron(row.cron),
    categoryIds: jsonValue<number[] | null>(row.categoryIds, null),
    recipients: jsonValue<string[]>(row.recipients, []),
    produce: row.produce,
    enabled: row.enabled,
    nextRunAt: next ? isoInZone(next, row.timeZone) : null,
    lastDueAt: row.lastDueAt ? isoInZone(row.lastDueAt, row.timeZone) : null,
    createdAt: row.createdAt.toISOString(),
    updatedAt: row.updatedAt.toISOString(),
  };
}

export function previewSchedule(cronExpression: string, timeZone: string, now = new Date()): SchedulePreview {
  return {
    cron: cronExpression,
    timeZone,
    description: describeCron(cronExpression),
    nextRuns: nextRuns(cronExpression, timeZone, now, 5).map((d) => isoInZone(d, timeZone)),
  };
}

/** node-cron fires the ticks; refuse what it would not accept even when cron-parser does. */
function assertSchedulable(expression: string): void {
  if (!cron.validate(expression)) {
    throw new AppError(
      'validation_failed',
      `The scheduler cannot run the cron expression "${expression}".`,
      400,
      [{ path: 'cron', message: 'Not accepted by the scheduler.' }],
    );
  }
}

async function assertCategories(ids: number[] | null | undefined): Promise<void> {
  if (!ids) return;
  const found = await categoriesFor(ids);
  const missing = [...new Set(ids)].filter((id) => !found.includes(id));
  if (missing.length > 0) {
    throw new AppError('validation_failed', `Unknown category id(s): ${missing.join(', ')}.`, 400, [
      { path: 'categoryIds', message: 'Pick categories that exist.' },
    ]);
  }
}

async function assertNameFree(name: string, exceptId?: number): Promise<void> {
  const other = await ReportSchedule.findOne({ where: { name }, attributes: ['id'] });
  if (other && other.id !== exceptId) {
    throw new AppError('conflict', `A schedule called "${name}" already exists.`, 409);
  }
}

export async function listSchedules(now = new Date()): Promise<ScheduleRecord[]> {
  const rows = await ReportSchedule.findAll({ order: [['name', 'ASC']] });
  return rows.map((r) => toRecord(r, now));
}

async function findSchedule(id: number): Promise<ReportSchedule> {
  const row = await ReportSchedule.findByPk(id);
  if (!row) throw AppError.notFound('The schedule');
  return row;
}

export async function getSchedule(id: number, now = new Date()): Promise<ScheduleRecord> {
  return toRecord(await findSchedule(id), now);
}

export async function createSchedule(
  input: ScheduleValues,
  actor: Actor,
  ip?: string,
  now = new Date(),
): Promise<ScheduleRecord> {
  assertSchedulable(input.cron);
  await assertCategories(input.categoryIds);
  await assertNameFree(input.name);
  const row = await ReportSchedule.create({
    name: input.name,
    cron: input.cron,
    timeZone: input.timeZone,
    categoryIds: input.categoryIds ? [...new Set(input.categoryIds)].sort((a, b) => a - b) : null,
    recipients: [...new Set(input.recipients)],
    produce: input.produce,
    enabled: input.enabled,
    // Occurrences before the schedule existed are not owed: catch-up starts from here.
    lastDueAt: latestDue(input.cron, input.timeZone, now),
    createdBy: actor.kind === 'user' ? actor.id : null,
  });
  await recordAudit({
    actor,
    action: 'schedule.created',
    targetType: 'schedule',
    targetId: row.id,
    details: { ...input },
    ip,
  });
  jobEvents.emit('schedules-changed');
  return toRecord(row, now);
}

export async function updateSchedule(
  id: number,
  input: ScheduleUpdate,
  actor: Actor,
  ip?: string,
  now = new Date(),
): Promise<ScheduleRecord> {
  const row = await findSchedule(id);
  if (input.cron) assertSchedulable(input.cron);
  await assertCategories(input.categoryIds);
  if (input.name) await assertNameFree(input.name, id);
  const before = toRecord(row, now);
  const changes: Partial<ReportSchedule> = {};
  if (input.name !== undefined) changes.name = input.name;
  if (input.cron !== undefined) changes.cron = input.cron;
  if (input.timeZone !== undefined) changes.timeZone = input.timeZone;
  if (input.categoryIds !== undefined)
    changes.categoryIds = input.categoryIds ? [...new Set(input.categoryIds)].sort((a, b) => a - b) : null;
  if (input.recipients !== undefined) changes.recipients = [...new Set(input.recipients)];
  if (input.produce !== undefined) changes.produce = input.produce;
  if (input.enabled !== undefined) changes.enabled = input.enabled;
  const timing = input.cron !== undefined || input.timeZone !== undefined;
  const resumed = input.enabled === true && !row.enabled;
  if (timing || resumed) {
    // A paused stretch or an old timing is not owed: the next due time counts from now.
    changes.lastDueAt = latestDue(changes.cron ?? row.cron, changes.timeZone ?? row.timeZone, now);
  }
  await row.update(changes);
  const after = toRecord(row, now);

  const changedFields = Object.keys(input).filter(
    (k) =>
      JSON.stringify(before[k as keyof ScheduleRecord]) !== JSON.stringify(after[k as keyof ScheduleRecord]),
  );
  const pauseChange = input.enabled !== undefined && before.enabled !== after.enabled;
  if (pauseChange) {
    await recordAudit({
      actor,
      action: after.enabled ? 'schedule.resumed' : 'schedule.paused',
      targetType: 'schedule',
      targetId: id,
      details: { name: after.name },
      ip,
    });
  }
  const otherChanges = changedFields.filter((f) => f !== 'enabled');
  if (otherChanges.length > 0) {
    await recordAudit({
      actor,
      action: 'schedule.updated',
      targetType: 'schedule',
      targetId: id,
      details: Object.fromEntries(
        otherChanges.map((f) => [
          f,
          { from: before[f as keyof ScheduleRecord], to: after[f as keyof ScheduleRecord] },
        ]),
      ),
      ip,
    });
  }
  jobEvents.emit('schedules-changed');
  return after;
}

export async function deleteSchedule(id: number, actor: Actor, ip?: string): Promise<void> {
  const row = await findSchedule(id);
  const name = row.name;
  await row.destroy();
  await recordAudit({
    actor,
    action: 'schedule.deleted',
    targetType: 'schedule',
    targetId: id,
    details: { name, cron: row.cron, timeZone: row.timeZone },
    ip,
  });
  jobEvents.emit('schedules-changed');
}

/**
 * Queues one snapshot run per category of the schedule, now, outside its cron timing. Any scheduler may
 * claim them; with the scheduler of this process running they start at once.
 */
export async function runScheduleNow(
  id: number,
  options: { replace: boolean },
  actor: Actor,
  ip?: string,
  now = new Date(),
): Promise<{ runs: JobRunRecord[] }> {
  const row = await findSchedule(id);
  const categoryIds = await categoriesFor(jsonValue<number[] | null>(row.categoryIds, null));
  if (categoryIds.length === 0) {
    throw new AppError('bad_request', 'This schedule has no categories to snapshot.', 400);
  }
  const runs = await queueRuns(
    categoryIds.map((categoryId) => ({
      kind: row.produce === 'alerts' ? ('alerts' as const) : ('snapshot' as const),
      categoryId,
      scheduleId: row.id,
      isoWeek: lastCompletedIsoWeek(now),
      params: {
        asOf: now.toISOString(),
        replace: options.replace,
        then: row.produce === 'snapshot_digest' ? (['digest'] as const).slice() : [],
      },
      trigger: 'manual' as const,
      createdBy: actor.email,
      now,
    })),
  );
  await recordAudit({
    actor,
    action: 'schedule.run_now',
    targetType: 'schedule',
    targetId: id,
    details: { name: row.name, runIds: runs.map((r) => r.id), replace: options.replace },
    ip,
  });
  return { runs };
}

export type ActiveSchedule = {
  id: number;
  cron: string;
  timeZone: string;
  lastDueAt: Date | null;
  createdAt: Date;
};

/** What the scheduler needs of every enabled schedule. */
export async function activeSchedules(): Promise<ActiveSchedule[]> {
  const rows = await ReportSchedule.findAll({
    where: { enabled: true },
    attributes: ['id', 'cron', 'timeZone', 'lastDueAt', 'createdAt'],
    order: [['id', 'ASC']],
  });
  return rows.map((r) => ({
    id: r.id,
    cron: r.cron,
    timeZone: r.timeZone,
    lastDueAt: r.lastDueAt,
    createdAt: r.createdAt,
  }));
}
