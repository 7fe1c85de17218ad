import { simpleParser, type AddressObject } from 'mailparser';
import type { OutboxDetail, OutboxList, OutboxSummary } from '../../../shared/schemas/digests.schema';
import { OutboxMessage } from '../../db/models';
import { db } from '../../db/sequelize';
import { AppError } from '../../lib/app-error';

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(value) ? value : value ? [value] : [];
  return list.flatMap((a) => a.value.map((v) => v.address ?? v.name ?? '')).filter(Boolean);
}

/**
 * Stores a message the local SMTP server accepted. One row per Message-ID: a second copy (a resend after
 * a crash) only counts up `copies`, so the Outbox shows each mail once and the count shows any duplicate.
 */
export async function storeReceived(
  raw: Buffer,
  envelope: { from: string; to: string[] },
  now = new Date(),
): Promise<void> {
  const parsed = await simpleParser(raw, {
    skipHtmlToText: true,
    skipTextToHtml: true,
    skipImageLinks: true,
  });
  const messageId = (
    parsed.messageId ?? `<no-id-${now.getTime()}-${Math.random().toString(36).slice(2)}@ballast.local>`
  ).slice(0, 200);
  await db().query(
    `INSERT INTO outbox_messages (message_id, envelope_from, envelope_to, subject, raw, size_bytes, copies, received_at)
     VALUES (:messageId, :from, :to, :subject, :raw, :size, 1, :now)
     ON DUPLICATE KEY UPDATE copies = copies + 1`,
    {
      replacements: {
        messageId,
        from: envelope.from.slice(0, 254),
        to: JSON.stringify(envelope.to),
        subject: (parsed.subject ?? '(no subject)').slice(0, 500),
        raw,
        size: raw.length,
        now,
      },
    },
  );
}

function toSummary(row: OutboxMessage): OutboxSummary {
  const to = typeof row.envelopeTo === 'string' ? (JSON.parse(row.envelopeTo) as string[]) : row.envelopeTo;
  return {
    id: row.id,
    messageId: row.messageId,
    from: row.envelopeFrom,
    to,
    subject: row.subject,
    sizeBytes: row.sizeBytes,
    receivedAt: row.receivedAt.toISOString(),
    copies: row.copies,
  };
}

export async function listOutbox(query: { page: number; pageSize: number }): Promise<OutboxList> {
  const { rows, count } = await OutboxMessage.findAndCountAll({
    attributes: { exclude: ['raw'] },
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return { items: rows.map(toSummary), total: count };
}

async function load(id: number) {
  const row = await OutboxMessage.findByPk(id);
  if (!row) throw AppError.notFound('The message');
  const parsed = await simpleParser(row.raw, { skipImageLinks: true });
  return { row, parsed };
}

export async function getOutboxMessage(id: number): Promise<OutboxDetail> {
  const { row, parsed } = await load(id);
  const shown = ['from', 'to', 'subject', 'date', 'message-id', 'list-unsubscribe', 'list-unsubscribe-post'];
  return {
    ...toSummary(row),
    to: addresses(parsed.to).length ? addresses(parsed.to) : toSummary(row).to,
    text: parsed.text ?? '',
    hasHtml: typeof parsed.html === 'string' && parsed.html.length > 0,
    htmlUrl: `/api/outbox/${row.id}/html`,
    // In the order people read a mail (sender, recipient, subject, date), not the order they were written.
    headers: parsed.headerLines
      .filter((h) => shown.includes(h.key))
      .sort((a, b) => shown.indexOf(a.key) - shown.indexOf(b.key))
      .map((h) => ({
        name: h.line.split(':')[0] ?? h.key,
        // The subject arrives MIME-encoded (non-ASCII middle dots); show it as people read it.
        value:
          h.key === 'subject' && parsed.subject
            ? parsed.subject
            : h.line
                .slice(h.line.indexOf(':') + 1)
                .replace(/\r?\n\s+/g, ' ')
                .trim(),
      })),
    attachments: parsed.attachments.map((a, index) => ({
      index,
      fileName: a.filename ?? `attachment-${index + 1}`,
      contentType: a.contentType,
      sizeBytes: a.size,
      url: `/api/outbox/${row.id}/attachments/${index}`,
    })),
  };
}

export async function outboxHtml(id: number): Promise<string> {
  const { parsed } = await load(id);
  return typeof parsed.html === 'string' ? parsed.html : '<p>This message has no HTML part.</p>';
}

export async function outboxAttachment(
  id: number,
  index: number,
): Promise<{ fileName: string; contentType: string; content: Buffer }> {
  const { parsed } = await load(id);
  const a = parsed.attachments[index];
  if (!a) throw AppError.notFound('The attachment');
  return {
    fileName: a.filename ?? `attachment-${index + 1}`,
    contentType: a.contentType,
    content: a.content,
  };
}
