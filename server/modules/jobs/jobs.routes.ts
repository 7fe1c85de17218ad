import { z } from 'zod';
import {
  backfillInputSchema,
  jobListQuerySchema,
  jobListSchema,
  jobRunDetailSchema,
  jobRunSchema,
} from '../../../shared/schemas/jobs.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { getJobRun, listJobRuns, queueBackfill, retryJobRun } from './jobs.service';

const ops = access.roles(['ops', 'admin']);

function runId(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw AppError.notFound('The job run');
  return id;
}

export const jobRoutes = [
  route({
    method: 'get',
    path: '/api/jobs',
    tag: 'jobs',
    summary: 'Job history, newest first, filterable by status, category and schedule',
    access: ops,
    query: jobListQuerySchema,
    response: jobListSchema,
    handler: (_req, _res, { query }) => listJobRuns(query),
  }),
  route({
    method: 'get',
    path: '/api/jobs/:id',
    tag: 'jobs',
    summary: 'One job run with its log lines and error',
    access: ops,
    response: jobRunDetailSchema,
    handler: (req) => getJobRun(runId(req.params.id)),
  }),
  route({
    method: 'post',
    path: '/api/jobs/backfill',
    tag: 'jobs',
    summary: 'Queue backfill runs: past weekly snapshots of one category or all, from imported history',
    access: ops,
    body: backfillInputSchema,
    response: z.object({ runs: z.array(jobRunSchema) }),
    status: 202,
    handler: (req, _res, { body }) => queueBackfill(body, req.actor!, req.ip),
  }),
  route({
    method: 'post',
    path: '/api/jobs/:id/retry',
    tag: 'jobs',
    summary: 'Queue a new attempt of a failed run',
    access: ops,
    response: jobRunSchema,
    status: 202,
    handler: (req) => retryJobRun(runId(req.params.id), req.actor!, req.ip),
  }),
];
