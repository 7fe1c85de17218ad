import { z } from 'zod';
import { access, route } from '../../lib/route';
import { checkHealth } from './health.service';

export const healthRoutes = [
  route({
    method: 'get',
    path: '/api/health',
    tag: 'health',
    summary: 'Whether the server and its database answer (503 when the database does not)',
    access: access.public,
    sessionless: true,
    response: z.object({
      status: z.enum(['ok', 'degraded']),
      db: z.enum(['up', 'down']),
      reason: z.string().optional(),
      heavy: z.object({ running: z.number().int(), queued: z.number().int() }),
    }),
    handler: async (_req, res) => {
      const health = await checkHealth();
      res.status(health.db === 'up' ? 200 : 503);
      return health;
    },
  }),
];
