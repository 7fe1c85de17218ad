import nodemailer, { type SendMailOptions, type Transporter } from 'nodemailer';
import { countOf } from '../../../shared/plural';
import type { DigestKind, DigestSummary } from '../../../shared/schemas/digests.schema';
import { renderDigestMail } from '../../../templates/mail/render';
import { loadConfig, type Config } from '../../config/env';
import { Category, Digest, MailDelivery } from '../../db/models';
import { claimDue, startQueueWorker, type QueueWorker } from '../../lib/leased-queue';
import { logger } from '../../lib/logger';
import { digestFileName } from '../digests/digests.service';
import { composeAlertMail } from '../alerts/alert-mail.service';
import { unsubscribeToken } from '../subscriptions/subscriptions.service';
import { mailEvents } from './mail-events';

export const MAX_ATTEMPTS = 8;
/** How long a worker owns a claimed delivery; after that another worker may take it (the first one died). */
export const LEASE_MS = 120_000;

/** 30 s, 1 min, 2 min ... capped at an hour, with a little jitter so retries of many mails spread out. */
export function backoffMs(attempts: number, random = Math.random): number {
  const base = Math.min(30_000 * 2 ** Math.max(0, attempts - 1), 3_600_000);
  return Math.round(base * (0.9 + random() * 0.2));
}

/** A real SMTP server when SMTP_HOST is set, otherwise Ballast's local one on loopback. */
export function createMailTransport(mail: Config['mail'], localPort = mail.localPort): Transporter {
  if (mail.smtp) {
    return nodemailer.createTransport({
      host: mail.smtp.host,
      port: mail.smtp.port,
      secure: mail.smtp.secure,
      ...(mail.smtp.user ? { auth: { user: mail.smtp.user, pass: mail.smtp.pass ?? '' } } : {}),
      connectionTimeout: 15_000,
      greetingTimeout: 15_000,
      socketTimeout: 60_000,
    });
  }
  return nodemailer.createTransport({
    host: '127.0.0.1',
    port: localPort,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5_000,
    greetingTimeout: 5_000,
    socketTimeout: 30_000,
  });
}

function weekRange(summary: DigestSummary): string {
  const fmt = (d: string) =>
    new Date(`${d}T00:00:00Z`).toLocaleDateString('en-GB', {
      day: 'numeric',
      month: 'short',
      year: 'numeric',
      timeZone: 'UTC',
    });
  return `${fmt(summary.weekStart)} to ${fmt(summary.weekEnd)}`;
}

/** What the attached PDF holds, in the words of its own pages; the mail promises nothing more. */
export function attachmentContents(kind: DigestKind, categoryCount: number): string {
  if (kind === 'category')
    return 'the drift chart, every flagged item, the full standings and the parameters used';
  return `a page comparing the ${countOf(categoryCount, 'category', 'categories')}, then one page per category with its key figures, drift chart, smoothed top five, items worth a look and changes since last week. Each category's full standings and parameters are in its own digest`;
}

export type ComposedMail = SendMailOptions & { messageId: string };

/** The mail of one delivery: HTML and plain text from templates/mail, the PDF attached, a signed unsubscribe link. */
export async function composeDeliveryMail(
  delivery: Pick<MailDelivery, 'id' | 'recipient' | 'messageId' | 'target'>,
  digest: Pick<Digest, 'kind' | 'categoryId' | 'isoWeek' | 'pdf' | 'pageCount' | 'summary'>,
  config: Config = loadConfig(),
): Promise<ComposedMail> {
  const summary = (
    typeof digest.summary === 'string' ? JSON.parse(digest.summary) : digest.summary
  ) as DigestSummary;
  const slug =
    digest.kind === 'category'
      ? (summary.categorySlug ?? (await Category.findByPk(digest.categoryId))?.slug ?? null)
      : null;
  const fileName = digestFileName(digest.kind, slug, digest.isoWeek);
  const token = unsubscribeToken(delivery.id);
  const base = config.publicUrl.replace(/\/$/, '');
  const unsubscribeUrl = `${base}/unsubscribe?token=${encodeURIComponent(token)}`;
  const heading =
    digest.kind === 'portfolio' ? 'Portfolio digest' : (summary.categoryName ?? 'Category digest');
  const targetLabel =
    digest.kind === 'portfolio' ? 'the portfolio digest' : `the weekly digest of ${heading}`;
  const body = renderDigestMail({
    summary,
    heading,
    weekRange: weekRange(summary),
    preheader: summary.headline[0] ?? summary.title,
    fileName,
    pages: countOf(digest.pageCount, 'page'),
    contents: attachmentContents(digest.kind, summary.categories.length),
    recipient: delivery.recipient,
    targetLabel,
    unsubscribeUrl,
  });
  return {
    from: config.mail.from,
    to: delivery.recipient,
    subject: `Ballast · ${heading} · week ${digest.isoWeek}`,
    text: body.text,
    html: body.html,
    messageId: delivery.messageId,
    headers: {
      'List-Unsubscribe': `<${base}/api/unsubscribe?token=${encodeURIComponent(token)}>`,
      'List-Unsubscribe-Post': 'List-Unsubscribe=One-Click',
      'X-Ballast-Delivery': String(delivery.id),
    },
    attachments: [{ filename: fileName, content: digest.pdf, contentType: 'application/pdf' }],
  };
}

export type WorkerPass = { claimed: number; sent: number; retrying: number; failed: number };

function message(err: unknown): string {
  return (err instanceof Error ? err.message : String(err)).slice(0, 990);
}

/**
 * One pass of the mail worker. Each due delivery is claimed with a conditional update (status 'sending'
 * and a lease), sent with the Message-ID fixed when it was queued, and recorded as sent. If the process
 * dies between the SMTP server's acceptance and that record, the lease runs out and a later pass sends it
 * again with the same Message-ID, which receivers (Ballast's local one included) use to drop the copy.
 */
export async function processDueDeliveries(options: {
  transport: Transporter;
  now?: Date;
  limit?: number;
  config?: Config;
}): Promise<WorkerPass> {
  const now = options.now ?? new Date();
  const config = options.config ?? loadConfig();
  const pass: WorkerPass = { claimed: 0, sent: 0, retrying: 0, failed: 0 };
  const claimed = await claimDue(MailDelivery, { now, leaseMs: LEASE_MS, limit: options.limit ?? 50 });
  for (const id of claimed) {
    pass.claimed += 1;
    const delivery = (await MailDelivery.findByPk(id))!;
    const digest = delivery.digestId ? await Digest.findByPk(delivery.digestId) : null;
    if (!digest && !delivery.alertMailId) {
      await MailDelivery.update(
        { status: 'failed', lastError: 'The digest of this mail no longer exists.', leaseUntil: null },
        { where: { id: delivery.id } },
      );
      pass.failed += 1;
      continue;
    }
    try {
      const mail = digest
        ? await composeDeliveryMail(delivery, digest, config)
        : await composeAlertMail({ ...delivery.get(), alertMailId: delivery.alertMailId! }, config);
      await options.transport.sendMail(mail);
      await MailDelivery.update(
        { status: 'sent', sentAt: new Date(), leaseUntil: null, lastError: null, nextAttemptAt: null },
        { where: { id: delivery.id, status: 'sending' } },
      );
      pass.sent += 1;
    } catch (err) {
      const giveUp = delivery.attempts >= MAX_ATTEMPTS;
      await MailDelivery.update(
        {
          status: giveUp ? 'failed' : 'queued',
          lastError: message(err),
          leaseUntil: null,
          nextAttemptAt: giveUp ? null : new Date(now.getTime() + backoffMs(delivery.attempts)),
        },
        { where: { id: delivery.id, status: 'sending' } },
      );
      if (giveUp) pass.failed += 1;
      else pass.retrying += 1;
      logger.warn(
        { deliveryId: delivery.id, attempts: delivery.attempts, err: message(err) },
        'mail delivery failed',
      );
    }
  }
  return pass;
}

export type MailWorker = QueueWorker;

/** Runs worker passes every `everyMs` and whenever mail is queued in this process. */
export function startMailWorker(options: {
  transport: Transporter;
  everyMs?: number;
  config?: Config;
}): MailWorker {
  const worker = startQueueWorker({
    name: 'mail',
    everyMs: options.everyMs ?? 15_000,
    events: mailEvents,
    batch: 50,
    drain: () =>
      processDueDeliveries({
        transport: options.transport,
        ...(options.config ? { config: options.config } : {}),
      }),
  });
  return {
    kick: worker.kick,
    stop: async () => {
      await worker.stop();
      options.transport.close();
    },
  };
}
