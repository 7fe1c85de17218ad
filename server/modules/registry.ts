import { Router, type RequestHandler } from 'express';
import { jsonBody } from '../lib/json-body';
import type { RouteDef } from '../lib/route';
import { guard } from '../middleware/guard';
import { alertRoutes } from './alerts/alerts.routes';
import { authRoutes } from './auth/auth.routes';
import { calibrationRoutes } from './calibrations/calibrations.routes';
import { categoryRoutes } from './categories/categories.routes';
import { digestRoutes } from './digests/digests.routes';
import { healthRoutes } from './health/health.routes';
import { importRoutes } from './imports/imports.routes';
import { jobRoutes } from './jobs/jobs.routes';
import { mailRoutes } from './mail/mail.routes';
import { openapiRoutes } from './openapi/openapi.routes';
import { scoreRoutes } from './score/score.routes';
import { subscriptionRoutes } from './subscriptions/subscriptions.routes';
import { tokenRoutes } from './tokens/tokens.routes';
import { scheduleRoutes } from './schedules/schedules.routes';
import { standingsRoutes } from './standings/standings.routes';
import { userRoutes } from './users/users.routes';
import { webhookRoutes } from './webhooks/webhooks.routes';

/** Every API route of Ballast. The role-matrix test and the OpenAPI document both read this list. */
export const apiRoutes: RouteDef[] = [
  ...healthRoutes,
  ...authRoutes,
  ...categoryRoutes,
  ...userRoutes,
  ...scheduleRoutes,
  ...jobRoutes,
  ...openapiRoutes,
  ...scoreRoutes,
  ...calibrationRoutes,
  ...importRoutes,
  ...tokenRoutes,
  ...standingsRoutes,
  ...digestRoutes,
  ...mailRoutes,
  ...subscriptionRoutes,
  ...alertRoutes,
  ...webhookRoutes,
];

const bodyLeftForTheHandler: RequestHandler = (_req, _res, next) => next();

export function buildApiRouter(routes: RouteDef[]): Router {
  const router = Router();
  for (const def of routes) {
    // Bodies are read after the guard, so a caller who may not use a route cannot make the server read one.
    const body = def.bodyInWorker ? bodyLeftForTheHandler : jsonBody;
    router[def.method](def.path, guard(def.access), body, async (req, res) => {
      const body = def.body && !def.bodyInWorker ? def.body.parse(req.body ?? {}) : undefined;
      const query = def.query ? def.query.parse(req.query) : undefined;
      const result = await def.handler(req, res, { body, query });
      if (res.headersSent || result === undefined) return;
      if (res.statusCode === 200 && def.status) res.status(def.status);
      if (res.statusCode === 204) res.end();
      else res.json(result);
    });
  }
  return router;
}
