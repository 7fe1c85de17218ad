import { z } from 'zod';
import {
  deliveryListQuerySchema,
  deliveryListSchema,
  deliveryRecordSchema,
  outboxDetailSchema,
  outboxListQuerySchema,
  outboxListSchema,
} from '../../../shared/schemas/digests.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { listDeliveries, resendDelivery } from './deliveries.service';
import { getOutboxMessage, listOutbox, outboxAttachment, outboxHtml } from './outbox.service';

const mailRoles = ['admin', 'ops'] as const;
const idParam = z.coerce.number().int().positive();

function id(value: unknown, what: string): number {
  const parsed = idParam.safeParse(value);
  if (!parsed.success) throw AppError.notFound(what);
  return parsed.data;
}

/** A received mail's HTML may hold anything: no scripts, no network, no forms, and only our page may frame it. */
const mailHtmlPolicy =
  "default-src 'none'; img-src data: cid:; style-src 'unsafe-inline'; font-src data:; frame-ancestors 'self'; form-action 'none'; base-uri 'none'; sandbox";

export const mailRoutes = [
  route({
    method: 'get',
    path: '/api/outbox',
    tag: 'mail',
    summary: "Messages Ballast's local SMTP server received, newest first",
    access: access.roles(mailRoles),
    query: outboxListQuerySchema,
    response: outboxListSchema,
    handler: (_req, _res, { query }) => listOutbox(query),
  }),
  route({
    method: 'get',
    path: '/api/outbox/:id',
    tag: 'mail',
    summary: 'One received message: headers, plain text and attachments',
    access: access.roles(mailRoles),
    response: outboxDetailSchema,
    handler: (req) => getOutboxMessage(id(req.params.id, 'The message')),
  }),
  route({
    method: 'get',
    path: '/api/outbox/:id/html',
    tag: 'mail',
    summary: 'The HTML part of a received message, served under a locked-down policy for a sandboxed frame',
    access: access.roles(mailRoles),
    handler: async (req, res) => {
      const html = await outboxHtml(id(req.params.id, 'The message'));
      res.setHeader('Content-Type', 'text/html; charset=utf-8');
      res.setHeader('Content-Security-Policy', mailHtmlPolicy);
      res.setHeader('X-Content-Type-Options', 'nosniff');
      res.setHeader('Referrer-Policy', 'no-referrer');
      res.setHeader('Cache-Control', 'private, no-store');
      res.status(200).send(html);
      return undefined;
    },
  }),
  route({
    method: 'get',
    path: '/api/outbox/:id/attachments/:index',
    tag: 'mail',
    summary: 'Download one attachment of a received message',
    access: access.roles(mailRoles),
    handler: async (req, res) => {
      const file = await outboxAttachment(id(req.params.id, 'The message'), Number(req.params.index));
      const safeName = file.fileName.replace(/[^\w.-]+/g, '_');
      res.setHeader('Content-Type', file.contentType);
      res.setHeader('Content-Length', String(file.content.length));
      res.setHeader('Content-Disposition', `attachment; filename="${safeName}"`);
      res.setHeader('X-Content-Type-Options', 'nosniff');
      res.status(200).end(file.content);
      return undefined;
    },
  }),
  route({
    method: 'get',
    path: '/api/deliveries',
    tag: 'mail',
    summary: 'Mail deliveries of digests, with a status filter',
    access: access.roles(mailRoles),
    query: deliveryListQuerySchema,
    response: deliveryListSchema,
    handler: (_req, _res, { query }) => listDeliveries(query),
  }),
  route({
    method: 'post',
    path: '/api/deliveries/:id/resend',
    tag: 'mail',
    summary: 'Send a failed or sent delivery again',
    access: access.roles(mailRoles),
    response: deliveryRecordSchema,
    handler: (req) => resendDelivery(id(req.params.id, 'The delivery'), req.actor!, req.ip),
  }),
];
