import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { simpleParser, type ParsedMail } from 'mailparser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lastCompletedIsoWeek } from '../../../shared/iso-week';
import { loadConfig } from '../../../server/config/env';
import {
  Category,
  Item,
  MailDelivery,
  OutboxMessage,
  ReportSchedule,
  Snapshot,
  SnapshotRow,
} from '../../../server/db/models';
import { produceDigests } from '../../../server/modules/digests/digests.service';
import { startLocalSmtpServer, type LocalSmtpServer } from '../../../server/modules/mail/local-smtp';
import {
  composeDeliveryMail,
  createMailTransport,
  processDueDeliveries,
} from '../../../server/modules/mail/mail.service';
import { categoryRecipients } from '../../../server/modules/subscriptions/subscriptions.service';
import { demoAccounts } from '../../../server/runtime/seed';
import { testDemoAsOf } from '../../helpers/demo-data';
import { setupTestApp, type TestApp } from '../../helpers/test-app';
import { demoWithSnapshots } from '../digests/demo-weeks';
import { pdfPages } from '../digests/pdf-text';

const week = lastCompletedIsoWeek(testDemoAsOf);
const manager = demoAccounts.find((a) => a.role === 'manager')!.email;
const exec = demoAccounts.find((a) => a.role === 'exec')!.email;
const hostile = '<script>alert(1)</script>';
const longTitle = `Marathon ${'endurance '.repeat(40)}`.slice(0, 300);
/** Markup, quotes and a header break in a category name: all must stay text in subject, HTML and PDF. */
const hostileCategory = '<img src=x onerror=alert(2)>Garden "Tools" & Co\r\nBcc: intruder@example.test';

let t: TestApp;
let smtp: LocalSmtpServer;
let port: number;
const config = loadConfig();
const transport = () => createMailTransport({ ...config.mail, smtp: null }, port);

async function received(): Promise<{ row: OutboxMessage; mail: ParsedMail }[]> {
  const rows = await OutboxMessage.findAll({ order: [['id', 'ASC']] });
  return Promise.all(rows.map(async (row) => ({ row, mail: await simpleParser(row.raw) })));
}

beforeAll(async () => {
  t = await setupTestApp();
  await demoWithSnapshots(3);
  smtp = await startLocalSmtpServer({ port: 0 });
  port = smtp.port;
  // The raw sort's leader of Portable Power appears in the mail's sentences: give it a hostile title.
  const pp = (await Category.findOne({ where: { slug: 'portable-power' } }))!;
  const snapshot = (await Snapshot.findOne({ where: { categoryId: pp.id, isoWeek: week } }))!;
  const leaders = await SnapshotRow.findAll({ where: { snapshotId: snapshot.id, naiveRank: 1 } });
  await Item.update({ title: hostile }, { where: { id: leaders.map((l) => l.itemId) } });
  const top = (await SnapshotRow.findOne({ where: { snapshotId: snapshot.id, smoothedRank: 1 } }))!;
  await Item.update({ title: longTitle }, { where: { id: top.itemId } });
  await Category.update({ name: hostileCategory }, { where: { slug: 'garden-tools' } });
}, 180_000);
afterAll(async () => {
  await smtp.close();
  await t.close();
});

describe('digest mail through the local SMTP server', () => {
  let scheduleId: number;

  it('queues one mail per subscriber, the schedule extras included, and sends each once', async () => {
    const pp = (await Category.findOne({ where: { slug: 'portable-power' } }))!;
    const schedule = await ReportSchedule.create({
      name: 'Monday digest',
      cron: '0 6 * * 1',
      timeZone: 'Europe/London',
      categoryIds: [pp.id],
      recipients: ['buyer.extra@example.test'],
      produce: 'snapshot_digest',
      lastDueAt: null,
      createdBy: null,
    });
    scheduleId = schedule.id;
    const result = await produceDigests({
      isoWeek: week,
      categoryIds: [pp.id],
      scheduleId,
      now: testDemoAsOf,
    });
    // the manager, the schedule's extra recipient and, since every category of the schedule is done, the
    // portfolio digest to the executive
    expect(result.queued).toBe(3);
    const all = await produceDigests({ isoWeek: week, portfolio: true, now: testDemoAsOf });
    // only Kettles to its manager is new; nobody is queued twice for one digest
    expect(all.queued).toBe(1);
    const pass = await processDueDeliveries({ transport: transport(), config });
    expect(pass).toMatchObject({ claimed: 4, sent: 4, retrying: 0 });
    const mails = await received();
    expect(mails.map((m) => m.row.envelopeTo[0]).sort()).toEqual(
      [exec, manager, manager, 'buyer.extra@example.test'].sort(),
    );
    expect(mails.every((m) => m.row.copies === 1)).toBe(true);
    expect((await processDueDeliveries({ transport: transport(), config })).claimed).toBe(0);
  });

  it('carries the PDF, the key figures, the week link and a working one-time unsubscribe link', async () => {
    const mails = await received();
    const pp = mails.find(
      (m) => m.row.envelopeTo[0] === manager && m.mail.subject!.includes('Portable Power'),
    )!;
    expect(pp.mail.subject).toBe(`Ballast · Portable Power · week ${week}`);
    const [attachment] = pp.mail.attachments;
    expect(attachment!.filename).toBe(`ballast-portable-power-${week}.pdf`);
    expect(attachment!.contentType).toBe('application/pdf');
    expect((await pdfPages(attachment!.content))[0]).toContain('Portable Power');
    const link = `${config.publicUrl}/categories/portable-power?week=${week}`;
    expect(pp.mail.text).toContain(link);
    // Handlebars writes '=' in attribute values as an entity; mail clients read it back as '='
    expect(pp.mail.html).toContain(`href="${link.replace(/=/g, '&#x3D;')}"`);
    const snapshot = (await Snapshot.findOne({
      where: {
        isoWeek: week,
        categoryId: (await Category.findOne({ where: { slug: 'portable-power' } }))!.id,
      },
    }))!;
    expect(pp.mail.text).toContain(`Reviews counted: ${snapshot.reviewCount.toLocaleString('en-GB')}`);
    expect(pp.mail.text).toContain(snapshot.spearmanRho!.toFixed(3));
    // the hostile title is shown as text, never as markup
    expect(pp.mail.text).toContain(hostile);
    expect(pp.mail.html).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(pp.mail.html).not.toContain('<script');
    expect(pp.row.raw.toString('latin1')).toContain('List-Unsubscribe-Post: List-Unsubscribe=One-Click');

    const token = /unsubscribe\?token=([\w.%-]+)/.exec(pp.mail.text!)![1]!;
    const visitor = await t.anonymous();
    const info = await visitor.get(`/api/unsubscribe?token=${token}`).expect(200);
    expect(info.body).toMatchObject({
      email: manager,
      used: false,
      label: 'the weekly digest of Portable Power',
    });
    const first = await visitor
      .post(`/api/unsubscribe`)
      .send({ token: decodeURIComponent(token) })
      .expect(200);
    expect(first.body.outcome).toBe('unsubscribed');
    const again = await visitor.post(`/api/unsubscribe?token=${token}`).send({}).expect(200);
    expect(again.body.outcome).toBe('already_used');
    expect(again.body.message).toContain('already used');
    const pp2 = (await Category.findOne({ where: { slug: 'portable-power' } }))!;
    expect(await categoryRecipients(pp2.id)).not.toContain(manager);
    await visitor
      .post('/api/unsubscribe')
      .send({ token: `${token.split('.')[0]}.forgedforgedforged` })
      .expect(400);
  });

  it('describes only what the portfolio PDF holds and counts clusters, pages and mails right', async () => {
    const mails = await received();
    const portfolio = mails.find((m) => m.row.envelopeTo[0] === exec)!.mail;
    mkdirSync(path.resolve('test-results', 'digests'), { recursive: true });
    writeFileSync(path.resolve('test-results', 'digests', 'portfolio-mail.txt'), portfolio.text!);
    const [attachment] = portfolio.attachments;
    const pages = await pdfPages(attachment!.content);
    const pdfText = pages.join(' ');
    // The portfolio PDF has no standings table and no parameters page; the mail must not promise them.
    expect(pdfText).not.toContain('Full standings');
    expect(pdfText).not.toContain('Methods and parameters');
    for (const body of [portfolio.text!, portfolio.html as string]) {
      const flat = body.replace(/\s+/g, ' ').replace(/&#x27;/g, "'");
      expect(flat).not.toContain('the full standings and the parameters used');
      expect(flat).toContain(`(${pages.length} pages)`);
      expect(flat).toContain('one page per category with its key figures, drift chart, smoothed top five');
      expect(flat).toContain("Each category's full standings and parameters are in its own digest");
    }
    // Portable Power has the demo's one negative cluster: "1 cluster", never "1 clusters".
    const ppSnapshot = (await Snapshot.findOne({
      where: {
        isoWeek: week,
        categoryId: (await Category.findOne({ where: { slug: 'portable-power' } }))!.id,
      },
    }))!;
    expect(ppSnapshot.clusterCount).toBe(1);
    expect(portfolio.text).toMatch(/Portable Power: [^\n]*· 1 cluster\n/);
    expect(portfolio.text).not.toMatch(/\b1 clusters\b/);
    // The job log of a run that queues nothing new says so in words, not "mail(s)".
    const log: string[] = [];
    await produceDigests({ isoWeek: week, portfolio: true, now: testDemoAsOf, log: (l) => log.push(l) });
    expect(log.some((l) => l.startsWith('Queued 0 mails of Portable Power'))).toBe(true);
    expect(log.join('\n')).not.toMatch(/\(s\)/);
  });

  it('lets the manager subscribe again from the web app', async () => {
    const agent = await t.signIn('manager');
    const list = await agent.get('/api/me/digests').expect(200);
    const pp = (list.body as { target: string; categorySlug: string; subscribed: boolean }[]).find(
      (s) => s.categorySlug === 'portable-power',
    )!;
    expect(pp.subscribed).toBe(false);
    await agent
      .put('/api/me/digests')
      .set('x-csrf-token', agent.csrf)
      .send({ target: pp.target, subscribed: true })
      .expect(200);
    const id = (await Category.findOne({ where: { slug: 'portable-power' } }))!.id;
    expect(await categoryRecipients(id)).toContain(manager);
    const foreign = (await Category.findOne({ where: { slug: 'desk-lighting' } }))!.id;
    await agent
      .put('/api/me/digests')
      .set('x-csrf-token', agent.csrf)
      .send({ target: `category:${foreign}`, subscribed: true })
      .expect(403);
  });

  it('shows the received mail in the Outbox with its HTML under a sandboxing policy', async () => {
    const ops = await t.signIn('ops');
    const list = await ops.get('/api/outbox').expect(200);
    expect(list.body.total).toBe(4);
    const first = list.body.items.find((m: { subject: string }) => m.subject.includes('Portable Power'));
    const detail = await ops.get(`/api/outbox/${first.id}`).expect(200);
    expect(detail.body.attachments[0].fileName).toMatch(/^ballast-portable-power-/);
    // Headers are shown decoded, as a person reads them, not MIME-encoded.
    const subject = (detail.body.headers as { name: string; value: string }[]).find(
      (h) => h.name === 'Subject',
    );
    expect(subject?.value).toMatch(/^Ballast · Portable Power · week /);
    // In reading order: who from, to whom, about what, when; the unsubscribe headers last.
    expect((detail.body.headers as { name: string }[]).map((h) => h.name.toLowerCase())).toEqual([
      'from',
      'to',
      'subject',
      'date',
      'message-id',
      'list-unsubscribe',
      'list-unsubscribe-post',
    ]);
    const html = await ops.get(detail.body.htmlUrl).expect(200);
    expect(html.headers['content-security-policy']).toContain('sandbox');
    expect(html.headers['content-security-policy']).toContain("default-src 'none'");
    const pdf = await ops.get(detail.body.attachments[0].url).buffer(true).expect(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    await (await t.signIn('analyst')).get('/api/outbox').expect(403);
  });
});

describe('delivery while the SMTP server is down', () => {
  it('retries with backoff and delivers every message exactly once when it is back', async () => {
    await MailDelivery.update({ status: 'failed' }, { where: { status: 'sent' } });
    const ops = await t.signIn('ops');
    const ids = (await MailDelivery.findAll()).map((d) => d.id);
    await smtp.close();
    for (const id of ids)
      await ops.post(`/api/deliveries/${id}/resend`).set('x-csrf-token', ops.csrf).expect(200);
    const before = await OutboxMessage.count();
    const now = new Date();
    const down = await processDueDeliveries({ transport: transport(), config, now });
    expect(down).toMatchObject({ claimed: ids.length, sent: 0, retrying: ids.length });
    const waiting = await MailDelivery.findAll();
    for (const d of waiting) {
      expect(d.status).toBe('queued');
      expect(d.attempts).toBe(1);
      expect(d.lastError).toBeTruthy();
      expect(d.nextAttemptAt!.getTime()).toBeGreaterThan(now.getTime());
    }
    // not due yet: nothing is tried
    expect((await processDueDeliveries({ transport: transport(), config, now })).claimed).toBe(0);
    smtp = await startLocalSmtpServer({ port });
    const later = new Date(now.getTime() + 10 * 60_000);
    const up = await processDueDeliveries({ transport: transport(), config, now: later });
    expect(up.sent).toBe(ids.length);
    expect((await processDueDeliveries({ transport: transport(), config, now: later })).claimed).toBe(0);
    // failed deliveries keep their Message-ID on resend, so each message is stored once
    expect(await OutboxMessage.count()).toBe(before);
    const list = await ops.get('/api/deliveries?status=sent').expect(200);
    expect(list.body.total).toBe(ids.length);
  });

  it('does not store a duplicate when the process died after the SMTP server accepted the mail', async () => {
    const delivery = (await MailDelivery.findOne({ where: { recipient: 'buyer.extra@example.test' } }))!;
    const ops = await t.signIn('ops');
    await ops.post(`/api/deliveries/${delivery.id}/resend`).set('x-csrf-token', ops.csrf).expect(200);
    const fresh = (await MailDelivery.findByPk(delivery.id))!;
    expect(fresh.messageId).not.toBe(delivery.messageId);
    // a worker claims it and the SMTP server accepts it, then the process dies before recording 'sent'
    const { Digest } = await import('../../../server/db/models');
    const digest = (await Digest.findByPk(fresh.digestId!))!;
    await transport().sendMail(await composeDeliveryMail(fresh, digest, config));
    await MailDelivery.update(
      { status: 'sending', attempts: 1, leaseUntil: new Date(Date.now() - 1000) },
      { where: { id: fresh.id } },
    );
    const pass = await processDueDeliveries({ transport: transport(), config });
    expect(pass.sent).toBe(1);
    const stored = await OutboxMessage.findAll({ where: { messageId: fresh.messageId } });
    expect(stored).toHaveLength(1);
    expect(stored[0]!.copies).toBe(2);
    expect((await MailDelivery.findByPk(fresh.id))!.status).toBe('sent');
  });
});

describe('GET digest PDFs by role', () => {
  it('gives an executive the file with the right headers and keeps a manager out of foreign categories', async () => {
    const execAgent = await t.signIn('exec');
    const res = await execAgent
      .get(`/api/categories/portable-power/digests/${week}/pdf`)
      .buffer(true)
      .expect(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    expect(res.headers['content-disposition']).toBe(
      `attachment; filename="ballast-portable-power-${week}.pdf"`,
    );
    expect(Number(res.headers['content-length'])).toBe((res.body as Buffer).length);
    expect((res.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
    const inline = await execAgent
      .get(`/api/categories/portable-power/digests/${week}/pdf?disposition=inline`)
      .expect(200);
    expect(inline.headers['content-disposition']).toMatch(/^inline; /);

    const managerAgent = await t.signIn('manager');
    await managerAgent.get(`/api/categories/portable-power/digests/${week}/pdf`).expect(200);
    const foreign = await managerAgent.get(`/api/categories/desk-lighting/digests/${week}/pdf`).expect(403);
    expect(foreign.body.error.message).toBe('This category is not one of yours.');
    await managerAgent.get(`/api/portfolio/digests/${week}/pdf`).expect(403);
    for (const role of ['analyst', 'ops', 'admin'] as const) {
      await (await t.signIn(role)).get(`/api/categories/desk-lighting/digests/${week}/pdf`).expect(200);
      await (await t.signIn(role)).get(`/api/portfolio/digests/${week}/pdf`).expect(200);
    }
    await (await t.anonymous()).get(`/api/portfolio/digests/${week}/pdf`).expect(401);
    await execAgent.get(`/api/categories/portable-power/digests/2026-W01/pdf`).expect(404);
  });

  it('lists the archive of a category with file names and delivery counts', async () => {
    const agent = await t.signIn('analyst');
    const res = await agent.get('/api/categories/portable-power/digests').expect(200);
    expect(res.body[0]).toMatchObject({
      isoWeek: week,
      fileName: `ballast-portable-power-${week}.pdf`,
      kind: 'category',
    });
    expect(res.body[0].deliveries.sent).toBeGreaterThan(0);
  });
});

describe('a hostile category name', () => {
  it('stays text in the subject, the HTML and text parts and the PDF, and adds no header', async () => {
    const garden = (await Category.findOne({ where: { slug: 'garden-tools' } }))!;
    const schedule = await ReportSchedule.create({
      name: 'Garden digest',
      cron: '0 6 * * 1',
      timeZone: 'Europe/London',
      categoryIds: [garden.id],
      recipients: ['garden.reader@example.test'],
      produce: 'snapshot_digest',
      lastDueAt: null,
      createdBy: null,
    });
    await produceDigests({
      isoWeek: week,
      categoryIds: [garden.id],
      scheduleId: schedule.id,
      now: testDemoAsOf,
    });
    await processDueDeliveries({ transport: transport(), config });
    const mails = await received();
    const mail = mails.find((m) => m.row.envelopeTo.includes('garden.reader@example.test'))!.mail;
    expect(mails.some((m) => m.row.envelopeTo.includes('intruder@example.test'))).toBe(false);
    expect(mail.bcc).toBeUndefined();
    expect(mail.headers.has('bcc')).toBe(false);
    expect(mail.subject).toContain('<img src=x onerror=alert(2)>Garden "Tools" & Co');
    expect(mail.text).toContain('<img src=x onerror=alert(2)>Garden "Tools" & Co');
    expect(mail.html).toContain(
      '&lt;img src&#x3D;x onerror&#x3D;alert(2)&gt;Garden &quot;Tools&quot; &amp; Co',
    );
    expect(mail.html).not.toMatch(/<img[^>]*onerror/i);
    const pdfText = (await pdfPages(mail.attachments[0]!.content)).join('\n');
    expect(pdfText).toContain('<img src=x onerror=alert(2)>Garden "Tools" & Co');
    // The executive's portfolio mail lists every category by name, this one escaped as well.
    const portfolio = mails.find((m) => m.row.envelopeTo[0] === exec)!.mail;
    expect(portfolio.html).not.toMatch(/<img[^>]*onerror/i);
  });
});
