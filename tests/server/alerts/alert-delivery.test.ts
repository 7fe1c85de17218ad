import { createHmac } from 'node:crypto';
import { simpleParser } from 'mailparser';
import { Op, QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { alertRules } from '../../../shared/schemas/alerts.schema';
import { loadConfig } from '../../../server/config/env';
import {
  Category,
  CategoryOwner,
  MailDelivery,
  OutboxMessage,
  User,
  WebhookDelivery,
} from '../../../server/db/models';
import { db } from '../../../server/db/sequelize';
import {
  checkCategory,
  checksIdle,
  listenForEvidence,
} from '../../../server/modules/alerts/alert-check.service';
import { flushAlertMail } from '../../../server/modules/alerts/alert-mail.service';
import { startLocalSmtpServer, type LocalSmtpServer } from '../../../server/modules/mail/local-smtp';
import { createMailTransport, processDueDeliveries } from '../../../server/modules/mail/mail.service';
import { landingUrl, startLanding, type Landing } from '../../../server/modules/webhooks/landing';
import { processDueWebhooks } from '../../../server/modules/webhooks/webhooks.service';
import { demoAccounts } from '../../../server/runtime/seed';
import type { AlertItemState } from '../../../server/workers/tasks';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';
import { demoWithSnapshots } from '../digests/demo-weeks';

/** A Wednesday after the demo's last week: the alert checks compute as of this instant. */
const now = new Date('2026-12-02T12:00:00Z');
const env = { BALLAST_WEBHOOK_BACKOFF_MS: '50', BALLAST_WEBHOOK_TIMEOUT_MS: '3000' };
const config = loadConfig({ ...process.env, ...env });

let t: TestApp;
let admin: Agent;
let smtp: LocalSmtpServer;
let landing: Landing;
let landingPort: number;
let stopListening: () => void;
let category: Category;
let managerEmail: string;
let secret: string;
const firstSku: string[] = [];

async function until<T>(
  what: string,
  probe: () => Promise<T | null | undefined | false>,
  ms = 20_000,
): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

async function state(): Promise<AlertItemState[]> {
  const [row] = await db().query<{ items: string | AlertItemState[] }>(
    'SELECT items FROM alert_states WHERE category_id = :id',
    { replacements: { id: category.id }, type: QueryTypes.SELECT },
  );
  return typeof row!.items === 'string' ? (JSON.parse(row!.items) as AlertItemState[]) : row!.items;
}

/** Twelve one-star reviews about a swelling battery in the last days of the demo, for one item. */
function complaints(item: AlertItemState, prefix: string, count = 12) {
  return Array.from({ length: count }, (_, i) => ({
    reviewId: `${prefix}-${i}`,
    sku: item.sku,
    title: item.title ?? item.sku,
    category: category.slug,
    stars: 1,
    reviewedAt: `2026-11-${String(17 + (i % 12)).padStart(2, '0')}`,
    text: 'The battery swelled after a week and the case cracked.',
  }));
}

async function landingRows() {
  return db().query<{
    id: number;
    event_id: string;
    verdict: string;
    body: string;
    timestamp_header: string;
    signature_header: string;
  }>(
    'SELECT id, event_id, verdict, body, timestamp_header, signature_header FROM landing_receipts ORDER BY id',
    { type: QueryTypes.SELECT },
  );
}

/** A quiet item with enough reviews that a dozen one-star ones are far above its own rate. */
async function calmItem(exclude: string[] = []): Promise<AlertItemState> {
  const calm = (await state())
    .filter((s) => s.cluster === false && s.n >= 30 && !exclude.includes(s.sku))
    .sort((a, b) => a.n - b.n || (a.sku < b.sku ? -1 : 1));
  expect(calm.length).toBeGreaterThan(0);
  return calm[0]!;
}

beforeAll(async () => {
  t = await setupTestApp(env);
  await demoWithSnapshots(2);
  admin = await t.signIn('admin');
  smtp = await startLocalSmtpServer({ port: 0 });
  landing = await startLanding({ port: 0 });
  landingPort = landing.port;
  managerEmail = demoAccounts.find((a) => a.role === 'manager')!.email;
  const manager = (await User.findOne({ where: { email: managerEmail } }))!;
  const owned = (await CategoryOwner.findAll({ where: { userId: manager.id } })).map((o) => o.categoryId);
  category = (await Category.findByPk(owned.sort((a, b) => a - b)[0]))!;
  // Only the cluster rule stays on, so the checks below can count exactly.
  for (const rule of alertRules.filter((r) => r !== 'new_cluster')) {
    await admin
      .put(`/api/categories/${category.slug}/alert-rules/${rule}`)
      .set('x-csrf-token', admin.csrf)
      .send({ enabled: false, dailyLimit: 5 })
      .expect(200);
  }
  // The first check records what the category looks like now; whatever it finds is not this test's.
  await checkCategory(category.id, { source: 'daily' }, now);
  await flushAlertMail(now);
  const created = await admin
    .post('/api/admin/webhooks')
    .set('x-csrf-token', admin.csrf)
    .send({ name: 'Landing under test', url: landingUrl(landingPort, 'test') })
    .expect(201);
  secret = created.body.secret as string;
  expect(secret).toMatch(/^bwh_/);
  stopListening = listenForEvidence(() => now);
}, 120_000);

afterAll(async () => {
  stopListening?.();
  await checksIdle();
  await landing?.close();
  await smtp?.close();
  await t?.close();
});

describe('an import that creates a negative cluster', () => {
  it('raises one alert, mails it once to the manager and delivers it once, signed, to the webhook', async () => {
    const item = await calmItem();
    firstSku.push(item.sku);
    const mailsBefore = await MailDelivery.max<number, MailDelivery>('id');
    const receiptsBefore = (await landingRows()).length;

    const res = await admin
      .post('/api/ingest/reviews')
      .set('x-csrf-token', admin.csrf)
      .send({ mode: 'valid_rows', rows: complaints(item, 'swell-a') })
      .expect(200);
    expect(res.body.errors).toEqual([]);
    expect(res.body.rowsInserted).toBe(12);
    await checksIdle();

    const history = await admin.get(`/api/categories/${category.slug}/alerts`).expect(200);
    const mine = (
      history.body.items as {
        rule: string;
        sku: string;
        importBatchId: number;
        evidence: { phrases?: unknown[] };
      }[]
    ).filter((a) => a.sku === item.sku);
    expect(mine).toHaveLength(1);
    expect(mine[0]!.rule).toBe('new_cluster');
    expect(mine[0]!.importBatchId).toBe(res.body.batchId);

    // Mail: one alert mail for the manager through the mail queue, read back from the local SMTP server.
    const pass = await flushAlertMail(now);
    expect(pass.mailed).toBeGreaterThanOrEqual(1);
    const transport = createMailTransport({ ...config.mail, smtp: null }, smtp.port);
    await processDueDeliveries({ transport, config });
    transport.close();
    const newMails = await MailDelivery.findAll({ where: { recipient: managerEmail } });
    const alertMails = newMails.filter((m) => m.id > (mailsBefore ?? 0) && m.alertMailId !== null);
    expect(alertMails).toHaveLength(1);
    expect(alertMails[0]!.status).toBe('sent');
    const outbox = await OutboxMessage.findAll();
    const parsed = await Promise.all(outbox.map((o) => simpleParser(o.raw)));
    const received = parsed.filter(
      (m) => m.messageId?.replace(/^<|>$/g, '') === alertMails[0]!.messageId.replace(/^<|>$/g, ''),
    );
    expect(received).toHaveLength(1);
    expect(received[0]!.text).toContain(item.sku);
    expect(received[0]!.text).toContain('New negative cluster');
    expect(received[0]!.text).toContain('not proof of a defect');

    // Webhook: exactly one delivery, and the signature checks out with node:crypto by the documented scheme.
    await until('the webhook delivery', async () => {
      await processDueWebhooks({ config });
      return (await landingRows()).length > receiptsBefore;
    });
    const rows = (await landingRows()).slice(receiptsBefore);
    expect(rows).toHaveLength(1);
    const r = rows[0]!;
    const expected = `v1=${createHmac('sha256', secret).update(`${r.timestamp_header}.${r.body}`).digest('hex')}`;
    expect(r.signature_header).toBe(expected);
    expect(r.verdict).toBe('verified');
    const payload = JSON.parse(r.body) as {
      type: string;
      eventId: string;
      alert: { item: { sku: string }; rule: string };
    };
    expect(payload).toMatchObject({
      type: 'ballast.alert',
      eventId: r.event_id,
      alert: { rule: 'new_cluster', item: { sku: item.sku } },
    });
    expect(await WebhookDelivery.count({ where: { eventId: r.event_id, status: 'sent' } })).toBe(1);

    // More complaints the same week: the cluster is not new any more, so nothing is raised again.
    await admin
      .post('/api/ingest/reviews')
      .set('x-csrf-token', admin.csrf)
      .send({ mode: 'valid_rows', rows: complaints(item, 'swell-b', 4) })
      .expect(200);
    await checksIdle();
    const again = await admin.get(`/api/categories/${category.slug}/alerts`).expect(200);
    expect((again.body.items as { sku: string }[]).filter((a) => a.sku === item.sku)).toHaveLength(1);
  });

  it('with the receiver down, retries the delivery and it arrives once after the receiver is back', async () => {
    await landing.close();
    const item = await calmItem(firstSku);
    const before = await WebhookDelivery.max<number, WebhookDelivery>('id');
    await admin
      .post('/api/ingest/reviews')
      .set('x-csrf-token', admin.csrf)
      .send({ mode: 'valid_rows', rows: complaints(item, 'swell-c') })
      .expect(200);
    await checksIdle();
    const delivery = await until('a queued delivery', () =>
      WebhookDelivery.findOne({ where: { id: { [Op.gt]: before ?? 0 } }, order: [['id', 'DESC']] }),
    );
    // Two failed attempts at least, with the error recorded and the delivery still queued.
    const retried = await until('two failed attempts', async () => {
      await processDueWebhooks({ config });
      const d = (await WebhookDelivery.findByPk(delivery.id))!;
      return d.attempts >= 2 && d.status === 'queued' ? d : null;
    });
    expect(retried.lastError).toMatch(/reach the receiver/);
    expect((await landingRows()).filter((r) => r.event_id === delivery.eventId)).toHaveLength(0);

    landing = await startLanding({ port: landingPort });
    const sent = await until('the delivery after the receiver is back', async () => {
      await processDueWebhooks({ config });
      const d = (await WebhookDelivery.findByPk(delivery.id))!;
      return d.status === 'sent' ? d : null;
    });
    expect(sent.attempts).toBeGreaterThanOrEqual(3);
    await processDueWebhooks({ config });
    const arrived = (await landingRows()).filter((r) => r.event_id === delivery.eventId);
    expect(arrived).toHaveLength(1);
    expect(arrived[0]!.verdict).toBe('verified');

    // The log and the resend button: a resend arrives again and the Landing marks it a repeat.
    const log = await admin.get(`/api/admin/webhooks/${sent.webhookId}/deliveries`).expect(200);
    expect((log.body as { id: number; status: string }[]).find((d) => d.id === delivery.id)?.status).toBe(
      'sent',
    );
    await admin
      .post(`/api/admin/webhook-deliveries/${delivery.id}/resend`)
      .set('x-csrf-token', admin.csrf)
      .expect(200);
    await until('the resent copy', async () => {
      await processDueWebhooks({ config });
      return (await landingRows()).filter((r) => r.event_id === delivery.eventId).length === 2;
    });
    const screen = await admin.get('/api/admin/landing').expect(200);
    const copies = (
      screen.body.items as { eventId: string; repeatOf: number | null; verdictText: string }[]
    ).filter((r) => r.eventId === delivery.eventId);
    expect(copies.map((c) => c.repeatOf !== null).sort()).toEqual([false, true]);
    expect(copies.every((c) => c.verdictText === 'Signature verified')).toBe(true);
  });
});
