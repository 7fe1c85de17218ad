import { randomBytes } from 'node:crypto';
import { UniqueConstraintError } from 'sequelize';
import type { DeliveryList, DeliveryListQuery, DeliveryRecord } from '../../../shared/schemas/digests.schema';
import { loadConfig } from '../../config/env';
import { Category, Digest, MailDelivery } from '../../db/models';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { mailEvents } from './mail-events';

/** The domain of MAIL_FROM, for Message-IDs that name the sender. */
export function mailDomain(from = loadConfig().mail.from): string {
  const address = /<([^>]+)>/.exec(from)?.[1] ?? from;
  return address.split('@')[1]?.trim() || 'ballast.invalid';
}

/** A Message-ID chosen once per delivery, before any attempt, and reused by every retry. */
export function newMessageId(digestId: number | null): string {
  return `<${digestId === null ? 'alerts' : `digest-${digestId}`}.${randomBytes(9).toString('base64url')}@${mailDomain()}>`;
}

/** Queues one mail per recipient; a recipient already queued for the digest is left alone. */
export async function queueDeliveries(
  digestId: number,
  target: string,
  recipients: string[],
  now = new Date(),
): Promise<number> {
  let queued = 0;
  for (const recipient of recipients) {
    try {
      await MailDelivery.create({
        digestId,
        recipient,
        target,
        status: 'queued',
        nextAttemptAt: now,
        leaseUntil: null,
        lastError: null,
        messageId: newMessageId(digestId),
        sentAt: null,
        unsubscribedAt: null,
      });
      queued += 1;
    } catch (err) {
      if (err instanceof UniqueConstraintError) continue;
      throw err;
    }
  }
  if (queued > 0) mailEvents.emit('queued');
  return queued;
}

type Joined = MailDelivery & { digest?: Digest & { categoryName?: string } };

async function labels(rows: Joined[]): Promise<Map<number, string>> {
  const ids = [...new Set(rows.map((r) => r.digest?.categoryId).filter((id): id is number => !!id))];
  const categories = ids.length
    ? await Category.findAll({ where: { id: ids }, attributes: ['id', 'name'] })
    : [];
  return new Map(categories.map((c) => [c.id, c.name]));
}

function toRecord(row: Joined, names: Map<number, string>): DeliveryRecord {
  const d = row.digest;
  const label = !d
    ? row.alertMailId
      ? 'Alerts'
      : 'digest'
    : d.kind === 'portfolio'
      ? 'Portfolio'
      : (names.get(d.categoryId) ?? `Category ${d.categoryId}`);
  return {
    id: row.id,
    digestId: row.digestId,
    digestLabel: label,
    isoWeek: d?.isoWeek ?? '',
    recipient: row.recipient,
    status: row.status,
    attempts: row.attempts,
    nextAttemptAt: row.status === 'queued' ? (row.nextAttemptAt?.toISOString() ?? null) : null,
    lastError: row.lastError,
    messageId: row.messageId,
    sentAt: row.sentAt?.toISOString() ?? null,
    createdAt: row.createdAt.toISOString(),
  };
}

const digestJoin = { model: Digest, as: 'digest', attributes: ['id', 'kind', 'categoryId', 'isoWeek'] };

export async function listDeliveries(query: DeliveryListQuery): Promise<DeliveryList> {
  const where = query.status ? { status: query.status } : {};
  const { rows, count } = await MailDelivery.findAndCountAll({
    where,
    include: [digestJoin],
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  const grouped = (await MailDelivery.findAll({
    attributes: ['status', [db().fn('COUNT', db().col('id')), 'count']],
    group: ['status'],
    raw: true,
  })) as unknown as { status: string; count: number }[];
  const counts: Record<string, number> = { queued: 0, sending: 0, sent: 0, failed: 0 };
  for (const g of grouped) counts[g.status] = Number(g.count);
  const names = await labels(rows as Joined[]);
  return { items: rows.map((r) => toRecord(r as Joined, names)), total: count, counts };
}

/**
 * Sends a delivery again. A failed one keeps its Message-ID (a copy may have arrived before the failure
 * was recorded, and the receiver can tell); a sent one gets a new Message-ID, because a second copy is
 * what the person asked for.
 */
export async function resendDelivery(
  id: number,
  actor: Actor,
  ip?: string,
  now = new Date(),
): Promise<DeliveryRecord> {
  const row = await MailDelivery.findByPk(id, { include: [digestJoin] });
  if (!row) throw AppError.notFound('The delivery');
  if (row.status === 'queued' || row.status === 'sending') {
    throw new AppError(
      'conflict',
      `This mail is already ${row.status === 'queued' ? 'waiting to be sent' : 'being sent'}.`,
      409,
    );
  }
  const wasSent = row.status === 'sent';
  await MailDelivery.update(
    {
      status: 'queued',
      attempts: 0,
      nextAttemptAt: now,
      leaseUntil: null,
      lastError: null,
      sentAt: null,
      ...(wasSent ? { messageId: newMessageId(row.digestId) } : {}),
    },
    { where: { id, status: row.status } },
  );
  await recordAudit({
    actor,
    action: 'mail.resent',
    targetType: 'mail_delivery',
    targetId: id,
    details: { recipient: row.recipient },
    ip,
  });
  mailEvents.emit('queued');
  const fresh = (await MailDelivery.findByPk(id, { include: [digestJoin] })) as Joined;
  return toRecord(fresh, await labels([fresh]));
}
