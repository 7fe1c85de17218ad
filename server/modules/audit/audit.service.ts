import { Op } from 'sequelize';
import type { AuditEntry, AuditQuery } from '../../../shared/admin';
import { AuditEvent } from '../../db/models';
import type { Actor } from '../../lib/actor';

export type AuditInput = {
  actor?: Pick<Actor, 'id' | 'email' | 'kind'> | null;
  actorEmail?: string;
  action: string;
  targetType?: string;
  targetId?: string | number;
  details?: Record<string, unknown>;
  ip?: string | undefined;
};

export async function recordAudit(input: AuditInput): Promise<void> {
  await AuditEvent.create({
    actorUserId: input.actor?.kind === 'user' ? input.actor.id : null,
    actorEmail: input.actor?.email ?? input.actorEmail ?? null,
    action: input.action,
    targetType: input.targetType ?? null,
    targetId: input.targetId === undefined ? null : String(input.targetId),
    details: input.details ?? null,
    ip: input.ip ?? null,
  });
}

export async function listAudit(query: AuditQuery): Promise<{ items: AuditEntry[]; total: number }> {
  const where = {
    ...(query.action ? { action: query.action } : {}),
    ...(query.actor ? { actorEmail: { [Op.like]: `%${query.actor.replace(/[%_\\]/g, '\\$&')}%` } } : {}),
  };
  const { rows, count } = await AuditEvent.findAndCountAll({
    where,
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  });
  return {
    total: count,
    items: rows.map((r) => ({
      id: Number(r.id),
      at: r.createdAt.toISOString(),
      actorEmail: r.actorEmail,
      action: r.action,
      targetType: r.targetType,
      targetId: r.targetId,
      details: r.details,
      ip: r.ip,
    })),
  };
}
