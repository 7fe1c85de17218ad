import { scoreRequestSchema, scoreResponseSchema } from '../../../shared/schemas/score.schema';
import { access, route } from '../../lib/route';
import { scoreItems } from './score.service';

export const scoreRoutes = [
  route({
    method: 'post',
    path: '/api/score',
    tag: 'scoring',
    summary:
      'Score items (count + mean, a star histogram, or individual reviews) with the naive and smoothed orderings, recency, quality and drift',
    access: access.roles(['admin', 'ops', 'manager', 'analyst', 'exec'], { tokens: true }),
    body: scoreRequestSchema,
    bodyInWorker: true,
    response: scoreResponseSchema,
    handler: async (req, res) => {
      const json = await scoreItems(req.actor!, req, res);
      res.type('json').send(Buffer.from(json.buffer, json.byteOffset, json.byteLength));
      return undefined;
    },
  }),
];
