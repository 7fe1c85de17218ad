import { randomBytes, randomUUID } from 'node:crypto';
import { EventEmitter } from 'node:events';
import { QueryTypes, UniqueConstraintError } from 'sequelize';
import {
  alertRuleDefaults,
  type AlertEvidence,
  type AlertRule,
  type CreateWebhookInput,
  type CreatedWebhook,
  type Webhook as WebhookRecord,
  type WebhookDelivery as WebhookDeliveryRecord,
} from '../../../shared/schemas/alerts.schema';
import { alertCaution, alertRuleName } from '../../../shared/vocabulary';
import { loadConfig, type Config } from '../../config/env';
import { Webhook, WebhookDelivery } from '../../db/models';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { claimDue, startQueueWorker, type QueueWorker } from '../../lib/leased-queue';
import { logger } from '../../lib/logger';
import { recordAudit } from '../audit/audit.service';
import { landingUrl } from './landing';
import { eventHeader, signatureHeader, signPayload, timestampHeader } from './webhook-signature';

export const webhookEvents = new EventEmitter<{ queued: [] }>();

export const LEASE_MS = 60_000;

/** base, 2 × base, 4 × base ... capped at an hour, with ±10 % jitter so many retries spread out. */
export function webhookBackoffMs(attempts: number, baseMs: number, random = Math.random): number {
  const base = Math.min(baseMs * 2 ** Math.max(0, attempts - 1), 3_600_000);
  return Math.round(base * (0.9 + random() * 0.2));
}

async function counts(): Promise<Map<number, Record<string, number>>> {
  const rows = await db().query<{ webhook_id: number; status: string; n: number }>(
    'SELECT webhook_id, status, COUNT(*) AS n FROM webhook_deliveries GROUP BY webhook_id, status',
    { type: QueryTypes.SELECT },
  );
  const out = new Map<number, Record<string, number>>();
  for (const r of rows) {
    const c = out.get(Number(r.webhook_id)) ?? { queued: 0, sending: 0, sent: 0, failed: 0 };
    c[r.status] = Number(r.n);
    out.set(Number(r.webhook_id), c);
  }
  return out;
}

function toRecord(w: Webhook, c: Map<number, Record<string, number>>): WebhookRecord {
  const n = c.get(w.id) ?? { queued: 0, sending: 0, sent: 0, failed: 0 };
  return {
    id: w.id,
    name: w.name,
    url: w.url,
    enabled: w.enabled,
    createdBy: w.createdBy,
    createdAt: w.createdAt.toISOString(),
    counts: { queued: n.queued ?? 0, sending: n.sending ?? 0, sent: n.sent ?? 0, failed: n.failed ?? 0 },
  };
}

export async function listWebhooks(): Promise<WebhookRecord[]> {
  const rows = await Webhook.findAll({ order: [['id', 'ASC']] });
  const c = await counts();
  return rows.map((w) => toRecord(w, c));
}

/** Registers an address; the secret is in this answer only (the list never shows it). */
export async function createWebhook(
  input: CreateWebhookInput,
  actor: Actor | null,
  ip?: string,
): Promise<CreatedWebhook> {
  const secret = `bwh_${randomBytes(24).toString('base64url')}`;
  const w = await Webhook.create({
    name: input.name,
    url: input.url,
    secret,
    createdBy: actor?.email ?? null,
  });
  await recordAudit({
    actor,
    action: 'webhooks.created',
    targetType: 'webhook',
    targetId: w.id,
    details: { name: w.name, url: w.url },
    ip,
  });
  return { ...toRecord(w, new Map()), secret };
}

export async function setWebhookEnabled(
  id: number,
  enabled: boolean,
  actor: Actor,
  ip?: string,
): Promise<WebhookRecord> {
  const w = await Webhook.findByPk(id);
  if (!w) throw AppError.notFound('The webhook');
  await w.update({ enabled });
  await recordAudit({
    actor,
    action: enabled ? 'webhooks.enabled' : 'webhooks.disabled',
    targetType: 'webhook',
    targetId: id,
    ip,
  });
  return toRecord(w, await counts());
}

export async function deleteWebhook(id: number, actor: Actor, ip?: string): Promise<void> {
  const w = await Webhook.findByPk(id);
  if (!w) throw AppError.notFound('The webhook');
  await w.destroy();
  await recordAudit({
    actor,
    action: 'webhooks.deleted',
    targetType: 'webhook',
    targetId: id,
    details: { url: w.url },
    ip,
  });
}

type AlertRow = {
  id: number;
  rule: AlertRule;
  sku: string;
  item_title: string | null;
  iso_week: string;
  headline: string;
  evidence: string | AlertEvidence;
  raised_at: Date;
  source: string;
  category_slug: string;
  category_name: string;
  threshold: number | null;
};

/** The JSON a webhook receives for one alert; fixed when queued, so every attempt sends the same bytes. */
export function alertPayload(a: AlertRow, eventId: string, config: Config): string {
  const base = config.publicUrl.replace(/\/$/, '');
  const evidence = (typeof a.evidence === 'string' ? JSON.parse(a.evidence) : a.evidence) as AlertEvidence;
  const threshold =
    alertRuleDefaults[a.rule].threshold === null
      ? null
      : (a.threshold ?? alertRuleDefaults[a.rule].threshold);
  return JSON.stringify({
    type: 'ballast.alert',
    eventId,
    alert: {
      id: a.id,
      rule: a.rule,
      ruleName: alertRuleName(a.rule, threshold),
      category: { slug: a.category_slug, name: a.category_name },
      item: { sku: a.sku, title: a.item_title },
      isoWeek: a.iso_week,
      source: a.source,
      headline: a.headline,
      evidence,
      raisedAt: new Date(a.raised_at).toISOString(),
      links: {
        item: `${base}/categories/${encodeURIComponent(a.category_slug)}/items/${encodeURIComponent(a.sku)}?alert=${a.id}`,
        history: `${base}/categories/${encodeURIComponent(a.category_slug)}/alerts`,
      },
    },
    caution: alertCaution,
  });
}

const alertSelect = `SELECT a.id, a.rule, a.sku, i.title AS item_title, a.iso_week, a.headline, a.evidence, a.raised_at, a.source,
    c.slug AS category_slug, c.name AS category_name, r.threshold
  FROM alerts a JOIN categories c ON c.id = a.category_id LEFT JOIN items i ON i.id = a.item_id
  LEFT JOIN alert_rules r ON r.category_id = a.category_id AND r.rule = a.rule`;

/** One delivery per alert and enabled webhook; a pair already queued is left alone. */
export async function queueWebhookDeliveries(
  alertIds: number[],
  now: Date,
  config = loadConfig(),
): Promise<number> {
  if (alertIds.length === 0) return 0;
  const hooks = await Webhook.findAll({ where: { enabled: true } });
  if (hooks.length === 0) return 0;
  const alerts = await db().query<AlertRow>(`${alertSelect} WHERE a.id IN (:ids) ORDER BY a.id`, {
    replacements: { ids: alertIds },
    type: QueryTypes.SELECT,
  });
  let queued = 0;
  for (const a of alerts) {
    for (const hook of hooks) {
      const eventId = `evt_${randomUUID()}`;
      try {
        await WebhookDelivery.create({
          webhookId: hook.id,
          alertId: a.id,
          eventId,
          body: alertPayload(a, eventId, config),
          status: 'queued',
          nextAttemptAt: now,
          leaseUntil: null,
          lastError: null,
          responseStatus: null,
          sentAt: null,
        });
        queued += 1;
      } catch (err) {
        if (err instanceof UniqueConstraintError) continue;
        throw err;
      }
    }
  }
  if (queued > 0) webhookEvents.emit('queued');
  return queued;
}

export type PostResult = { status: number } | { error: string; status?: number };

/**
 * One bounded POST: a time limit for the whole exchange, at most three redirects and only to the same
 * origin (307/308, which keep the method and body), and at most `maxResponseBytes` of the answer read.
 */
export async function postSigned(
  url: string,
  secret: string,
  eventId: string,
  body: string,
  config: Config['webhooks'],
  nowMs = Date.now(),
): Promise<PostResult> {
  const timestamp = Math.floor(nowMs / 1000);
  const headers = {
    'content-type': 'application/json',
    'user-agent': 'Ballast-Webhooks/1',
    [timestampHeader]: String(timestamp),
    [signatureHeader]: signPayload(secret, timestamp, body),
    [eventHeader]: eventId,
  };
  const signal = AbortSignal.timeout(config.timeoutMs);
  let target = new URL(url);
  try {
    for (let hop = 0; hop <= 3; hop++) {
      const res = await fetch(target, { method: 'POST', headers, body, redirect: 'manual', signal });
      if (res.status >= 300 && res.status < 400) {
        await res.body?.cancel();
        const location = res.headers.get('location');
        const next = location ? new URL(location, target) : null;
        if (!next || next.origin !== target.origin || (res.status !== 307 && res.status !== 308)) {
          return {
            error: `The receiver redirected (${res.status}) to another address; Ballast does not follow that.`,
            status: res.status,
          };
        }
        target = next;
        continue;
      }
      await readCapped(res, config.maxResponseBytes);
      if (res.status >= 200 && res.status < 300) return { status: res.status };
      return { error: `The receiver answered ${res.status}.`, status: res.status };
    }
    return { error: 'The receiver redirected more than three times.' };
  } catch (err) {
    const e = err as Error & { cause?: { code?: string } };
    if (e.name === 'TimeoutError' || e.name === 'AbortError')
      return { error: `No answer within ${config.timeoutMs} ms.` };
    return { error: `Could not reach the receiver: ${e.cause?.code ?? e.message}`.slice(0, 990) };
  }
}

async function readCapped(res: Response, max: number): Promise<void> {
  if (!res.body) return;
  const reader = res.body.getReader();
  let read = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) return;
    read += value.byteLength;
    if (read > max) {
      await reader.cancel();
      return;
    }
  }
}

export type WebhookPass = { claimed: number; sent: number; retrying: number; failed: number };

/** One pass of the webhook worker, with the same claim and lease as the mail queue. */
export async function processDueWebhooks(
  options: { now?: Date; limit?: number; config?: Config } = {},
): Promise<WebhookPass> {
  const now = options.now ?? new Date();
  const config = options.config ?? loadConfig();
  const pass: WebhookPass = { claimed: 0, sent: 0, retrying: 0, failed: 0 };
  const ids = await claimDue(WebhookDelivery, { now, leaseMs: LEASE_MS, limit: options.limit ?? 20 });
  for (const id of ids) {
    pass.claimed += 1;
    const d = (await WebhookDelivery.findByPk(id))!;
    const hook = await Webhook.findByPk(d.webhookId);
    if (!hook) continue;
    const result = await postSigned(hook.url, hook.secret, d.eventId, d.body, config.webhooks);
    if ('error' in result) {
      const giveUp = d.attempts >= config.webhooks.maxAttempts || !hook.enabled;
      await WebhookDelivery.update(
        {
          status: giveUp ? 'failed' : 'queued',
          lastError: result.error,
          responseStatus: result.status ?? null,
          leaseUntil: null,
          nextAttemptAt: giveUp
            ? null
            : new Date(Date.now() + webhookBackoffMs(d.attempts, config.webhooks.backoffMs)),
        },
        { where: { id, status: 'sending' } },
      );
      if (giveUp) pass.failed += 1;
      else pass.retrying += 1;
      logger.warn(
        { webhookDeliveryId: id, attempts: d.attempts, err: result.error },
        'webhook delivery failed',
      );
    } else {
      await WebhookDelivery.update(
        {
          status: 'sent',
          sentAt: new Date(),
          responseStatus: result.status,
          lastError: null,
          leaseUntil: null,
          nextAttemptAt: null,
        },
        { where: { id, status: 'sending' } },
      );
      pass.sent += 1;
    }
  }
  return pass;
}

export type WebhookWorker = QueueWorker;

/** Runs passes every `everyMs` and whenever a delivery is queued in this process. */
export function startWebhookWorker(options: { everyMs?: number; config?: Config } = {}): WebhookWorker {
  return startQueueWorker({
    name: 'webhook',
    everyMs: options.everyMs ?? 5_000,
    events: webhookEvents,
    batch: 20,
    drain: () => processDueWebhooks(options.config ? { config: options.config } : {}),
  });
}

function deliveryRecord(d: WebhookDelivery): WebhookDeliveryRecord {
  let headline = '';
  try {
    headline = (JSON.parse(d.body) as { alert?: { headline?: string } }).alert?.headline ?? '';
  } catch {
    headline = '';
  }
  return {
    id: d.id,
    webhookId: d.webhookId,
    eventId: d.eventId,
    alertId: d.alertId,
    headline,
    status: d.status,
    attempts: d.attempts,
    nextAttemptAt: d.status === 'queued' ? (d.nextAttemptAt?.toISOString() ?? null) : null,
    lastError: d.lastError,
    responseStatus: d.responseStatus,
    sentAt: d.sentAt?.toISOString() ?? null,
    createdAt: d.createdAt.toISOString(),
  };
}

export async function listWebhookDeliveries(
  webhookId: number,
  limit = 100,
): Promise<WebhookDeliveryRecord[]> {
  if (!(await Webhook.findByPk(webhookId))) throw AppError.notFound('The webhook');
  const rows = await WebhookDelivery.findAll({
    where: { webhookId },
    order: [['id', 'DESC']],
    limit,
  });
  return rows.map(deliveryRecord);
}

/** Sends a delivery again with the same event id and body (a receiver can tell it is a repeat). */
export async function resendWebhookDelivery(
  id: number,
  actor: Actor,
  ip?: string,
): Promise<WebhookDeliveryRecord> {
  const d = await WebhookDelivery.findByPk(id);
  if (!d) throw AppError.notFound('The delivery');
  if (d.status === 'queued' || d.status === 'sending') {
    throw new AppError(
      'conflict',
      `This delivery is already ${d.status === 'queued' ? 'waiting to be sent' : 'being sent'}.`,
      409,
    );
  }
  await WebhookDelivery.update(
    {
      status: 'queued',
      attempts: 0,
      nextAttemptAt: new Date(),
      leaseUntil: null,
      lastError: null,
      sentAt: null,
    },
    { where: { id, status: d.status } },
  );
  await recordAudit({ actor, action: 'webhooks.resent', targetType: 'webhook_delivery', targetId: id, ip });
  webhookEvents.emit('queued');
  return deliveryRecord((await WebhookDelivery.findByPk(id))!);
}

/** The demo's webhook: alerts go to the Landing, so a newcomer sees signed deliveries arrive. */
export async function ensureDemoWebhook(landingPort: number): Promise<boolean> {
  if ((await Webhook.count()) > 0) return false;
  await createWebhook({ name: 'The Landing (local)', url: landingUrl(landingPort) }, null);
  return true;
}
