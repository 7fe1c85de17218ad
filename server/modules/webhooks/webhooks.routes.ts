import { z } from 'zod';
import {
  createdWebhookSchema,
  createWebhookSchema,
  landingReceiptSchema,
  webhookDeliverySchema,
  webhookSchema,
} from '../../../shared/schemas/alerts.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { listLandingReceipts } from './landing';
import {
  createWebhook,
  deleteWebhook,
  listWebhookDeliveries,
  listWebhooks,
  resendWebhookDelivery,
  setWebhookEnabled,
} from './webhooks.service';

const tag = 'webhooks';
const admin = access.roles(['admin']);
const idParam = z.coerce.number().int().positive();

function id(value: unknown, what: string): number {
  const parsed = idParam.safeParse(value);
  if (!parsed.success) throw AppError.notFound(what);
  return parsed.data;
}

export const webhookRoutes = [
  route({
    method: 'get',
    path: '/api/admin/webhooks',
    tag,
    summary: 'Registered webhooks with their delivery counts (secrets are never listed)',
    access: admin,
    response: z.array(webhookSchema),
    handler: () => listWebhooks(),
  }),
  route({
    method: 'post',
    path: '/api/admin/webhooks',
    tag,
    summary: 'Register a webhook; the answer holds its signing secret, shown this once',
    access: admin,
    body: createWebhookSchema,
    response: createdWebhookSchema,
    status: 201,
    handler: (req, _res, { body }) => createWebhook(body, req.actor!, req.ip),
  }),
  route({
    method: 'patch',
    path: '/api/admin/webhooks/:id',
    tag,
    summary: 'Switch a webhook on or off',
    access: admin,
    body: z.object({ enabled: z.boolean() }),
    response: webhookSchema,
    handler: (req, _res, { body }) =>
      setWebhookEnabled(id(req.params.id, 'The webhook'), body.enabled, req.actor!, req.ip),
  }),
  route({
    method: 'delete',
    path: '/api/admin/webhooks/:id',
    tag,
    summary: 'Remove a webhook and its delivery log',
    access: admin,
    status: 204,
    handler: async (req, res) => {
      await deleteWebhook(id(req.params.id, 'The webhook'), req.actor!, req.ip);
      res.status(204).end();
      return undefined;
    },
  }),
  route({
    method: 'get',
    path: '/api/admin/webhooks/:id/deliveries',
    tag,
    summary: "A webhook's delivery log, newest first",
    access: admin,
    response: z.array(webhookDeliverySchema),
    handler: (req) => listWebhookDeliveries(id(req.params.id, 'The webhook')),
  }),
  route({
    method: 'post',
    path: '/api/admin/webhook-deliveries/:id/resend',
    tag,
    summary: 'Send a sent or failed webhook delivery again (same event id and body)',
    access: admin,
    response: webhookDeliverySchema,
    handler: (req) => resendWebhookDelivery(id(req.params.id, 'The delivery'), req.actor!, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/admin/landing',
    tag,
    summary: "What Ballast's local webhook receiver (the Landing) was sent, and whether each signature held",
    access: admin,
    response: z.object({ items: z.array(landingReceiptSchema), total: z.number().int() }),
    handler: () => listLandingReceipts(),
  }),
];
