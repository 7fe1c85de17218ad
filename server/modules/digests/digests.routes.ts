import type { Response } from 'express';
import {
  digestListSchema,
  pdfQuerySchema,
  produceDigestsResultSchema,
  produceDigestsSchema,
} from '../../../shared/schemas/digests.schema';
import { isoWeekSchema } from '../../../shared/schemas/iso-week.schema';
import { access, route } from '../../lib/route';
import { recordAudit } from '../audit/audit.service';
import {
  digestFile,
  listCategoryDigests,
  listPortfolioDigests,
  produceDigestsForSlugs,
  type DigestFile,
} from './digests.service';

const readers = ['admin', 'ops', 'analyst', 'exec'] as const;

/** The PDF itself: inline for the in-page preview, attachment (the default) for downloads. */
function sendPdf(res: Response, file: DigestFile, disposition: 'inline' | 'attachment'): undefined {
  res.status(200);
  res.setHeader('Content-Type', 'application/pdf');
  res.setHeader('Content-Length', String(file.pdf.length));
  res.setHeader('Content-Disposition', `${disposition}; filename="${file.fileName}"`);
  res.setHeader('Cache-Control', 'private, no-cache');
  res.setHeader('ETag', `"${file.sha256}"`);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  // The browser's PDF viewer is blocked by the app's `object-src 'none'`; a PDF runs none of our scripts.
  if (disposition === 'inline') res.removeHeader('Content-Security-Policy');
  res.end(file.pdf);
  return undefined;
}

export const digestRoutes = [
  route({
    method: 'get',
    path: '/api/categories/:slug/digests',
    tag: 'digests',
    summary: "A category's weekly digests, newest first (managers: their own categories)",
    access: access.category('slug'),
    response: digestListSchema,
    handler: (req) => listCategoryDigests(req.category!),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug/digests/:week/pdf',
    tag: 'digests',
    summary: 'The PDF of a category digest (?disposition=inline for preview)',
    access: access.category('slug'),
    query: pdfQuerySchema,
    handler: async (req, res, { query }) => {
      const week = isoWeekSchema.parse(req.params.week);
      const file = await digestFile('category', req.category!.id, req.category!.slug, week);
      return sendPdf(res, file, query.disposition);
    },
  }),
  route({
    method: 'get',
    path: '/api/portfolio/digests',
    tag: 'digests',
    summary: 'Weekly portfolio digests across every category, newest first',
    access: access.roles(readers),
    response: digestListSchema,
    handler: () => listPortfolioDigests(),
  }),
  route({
    method: 'get',
    path: '/api/portfolio/digests/:week/pdf',
    tag: 'digests',
    summary: 'The PDF of a portfolio digest (?disposition=inline for preview)',
    access: access.roles(readers),
    query: pdfQuerySchema,
    handler: async (req, res, { query }) => {
      const week = isoWeekSchema.parse(req.params.week);
      return sendPdf(res, await digestFile('portfolio', 0, null, week), query.disposition);
    },
  }),
  route({
    method: 'post',
    path: '/api/digests/produce',
    tag: 'digests',
    summary: 'Render (or render again) the digests of a week and queue their mail',
    access: access.roles(['admin', 'ops']),
    body: produceDigestsSchema,
    response: produceDigestsResultSchema,
    handler: async (req, _res, { body }) => {
      const result = await produceDigestsForSlugs(body);
      await recordAudit({
        actor: req.actor!,
        action: 'digest.produced',
        targetType: 'digest_week',
        targetId: body.isoWeek,
        details: { digests: result.digests.length, queued: result.queued },
        ip: req.ip,
      });
      return result;
    },
  }),
];
