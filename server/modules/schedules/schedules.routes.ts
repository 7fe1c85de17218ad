import { z } from 'zod';
import { parseInstant } from '../../../shared/clock';
import { jobRunSchema } from '../../../shared/schemas/jobs.schema';
import {
  runNowSchema,
  scheduleInputSchema,
  schedulePreviewQuerySchema,
  schedulePreviewSchema,
  scheduleSchema,
  scheduleUpdateSchema,
} from '../../../shared/schemas/schedules.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import {
  createSchedule,
  deleteSchedule,
  getSchedule,
  listSchedules,
  previewSchedule,
  runScheduleNow,
  updateSchedule,
} from './schedules.service';

const ops = access.roles(['ops', 'admin']);

function scheduleId(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw AppError.notFound('The schedule');
  return id;
}

export const scheduleRoutes = [
  route({
    method: 'get',
    path: '/api/schedules',
    tag: 'schedules',
    summary: 'Every report schedule with its plain-words timing and next run',
    access: ops,
    response: z.array(scheduleSchema),
    handler: () => listSchedules(),
  }),
  route({
    method: 'get',
    path: '/api/schedules/preview',
    tag: 'schedules',
    summary: 'A cron expression in plain words and its next five run times in a time zone',
    access: ops,
    query: schedulePreviewQuerySchema,
    response: schedulePreviewSchema,
    handler: (_req, _res, { query }) =>
      previewSchedule(query.cron, query.tz, (query.from ? parseInstant(query.from) : null) ?? new Date()),
  }),
  route({
    method: 'post',
    path: '/api/schedules',
    tag: 'schedules',
    summary: 'Create a report schedule',
    access: ops,
    body: scheduleInputSchema,
    response: scheduleSchema,
    status: 201,
    handler: (req, _res, { body }) => createSchedule(body, req.actor!, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/schedules/:id',
    tag: 'schedules',
    summary: 'One report schedule',
    access: ops,
    response: scheduleSchema,
    handler: (req) => getSchedule(scheduleId(req.params.id)),
  }),
  route({
    method: 'patch',
    path: '/api/schedules/:id',
    tag: 'schedules',
    summary: 'Change a report schedule, or pause and resume it with `enabled`',
    access: ops,
    body: scheduleUpdateSchema,
    response: scheduleSchema,
    handler: (req, _res, { body }) => updateSchedule(scheduleId(req.params.id), body, req.actor!, req.ip),
  }),
  route({
    method: 'delete',
    path: '/api/schedules/:id',
    tag: 'schedules',
    summary: 'Delete a report schedule (its job history stays)',
    access: ops,
    status: 204,
    handler: async (req) => {
      await deleteSchedule(scheduleId(req.params.id), req.actor!, req.ip);
      return {};
    },
  }),
  route({
    method: 'post',
    path: '/api/schedules/:id/run-now',
    tag: 'schedules',
    summary: 'Queue the schedule’s snapshot runs now, outside its timing',
    access: ops,
    body: runNowSchema,
    response: z.object({ runs: z.array(jobRunSchema) }),
    status: 202,
    handler: (req, _res, { body }) => runScheduleNow(scheduleId(req.params.id), body, req.actor!, req.ip),
  }),
];
