import { createHash, randomBytes } from 'node:crypto';
import { Op } from 'sequelize';
import {
  tokenRoles,
  tokenSecretPrefix,
  type ApiTokenRecord,
  type CreatedToken,
  type CreateTokenInput,
  type ReassignTokenInput,
  type TokenRole,
} from '../../../shared/schemas/tokens.schema';
import { ApiToken, Category, User } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';

/** last_used_at is written at most this often per token, so busy scripts do not write on every call. */
const lastUsedEveryMs = 60_000;

const sha256 = (text: string): string => createHash('sha256').update(text).digest('hex');

async function toRecords(tokens: ApiToken[]): Promise<ApiTokenRecord[]> {
  const categoryIds = [...new Set(tokens.flatMap((t) => t.categoryIds ?? []))];
  const categories = categoryIds.length
    ? await Category.findAll({ where: { id: categoryIds }, attributes: ['id', 'slug', 'name'] })
    : [];
  const byId = new Map(categories.map((c) => [c.id, { id: c.id, slug: c.slug, name: c.name }]));
  const creatorIds = [...new Set(tokens.map((t) => t.createdBy).filter((id): id is number => id !== null))];
  const creators = creatorIds.length
    ? await User.findAll({ where: { id: creatorIds }, attributes: ['id', 'name'] })
    : [];
  const names = new Map(creators.map((u) => [u.id, u.name]));
  return tokens.map((t) => ({
    id: t.id,
    name: t.name,
    prefix: t.prefix,
    role: t.role as TokenRole,
    categories: t.categoryIds
      ? t.categoryIds.flatMap((id) => {
          const c = byId.get(id);
          return c ? [c] : [];
        })
      : null,
    createdBy: t.createdBy ? (names.get(t.createdBy) ?? null) : null,
    createdById: t.createdBy ?? null,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
    revokedAt: t.revokedAt?.toISOString() ?? null,
  }));
}

export async function listTokens(): Promise<ApiTokenRecord[]> {
  const tokens = await ApiToken.findAll({ order: [['id', 'DESC']] });
  return toRecords(tokens);
}

/** Creates a token; the secret is in the answer only, Ballast keeps its sha256 and a short prefix. */
export async function createToken(input: CreateTokenInput, actor: Actor, ip?: string): Promise<CreatedToken> {
  const categoryIds = input.categoryIds?.length
    ? [...new Set(input.categoryIds)].sort((a, b) => a - b)
    : null;
  if (categoryIds) {
    const found = await Category.count({ where: { id: categoryIds } });
    if (found !== categoryIds.length)
      throw new AppError('bad_request', 'Some of those categories do not exist.', 400);
  }
  if (!tokenRoles.includes(input.role))
    throw new AppError('bad_request', 'That role cannot have tokens.', 400);
  const secret = `${tokenSecretPrefix}${randomBytes(24).toString('base64url')}`;
  const token = await ApiToken.create({
    name: input.name.trim(),
    tokenHash: sha256(secret),
    prefix: secret.slice(0, 12),
    role: input.role,
    categoryIds,
    createdBy: actor.kind === 'user' ? actor.id : null,
    lastUsedAt: null,
    revokedAt: null,
  });
  await recordAudit({
    actor,
    action: 'token.created',
    targetType: 'api_token',
    targetId: token.id,
    details: { name: token.name, role: token.role, categoryIds, prefix: token.prefix },
    ip,
  });
  const [record] = await toRecords([token]);
  return { token: record!, secret };
}

export async function revokeToken(id: number, actor: Actor, ip?: string): Promise<ApiTokenRecord> {
  const token = await ApiToken.findByPk(id);
  if (!token) throw AppError.notFound('The token');
  if (!token.revokedAt) {
    await token.update({ revokedAt: new Date() });
    await recordAudit({
      actor,
      action: 'token.revoked',
      targetType: 'api_token',
      targetId: token.id,
      details: { name: token.name, prefix: token.prefix },
      ip,
    });
  }
  const [record] = await toRecords([token]);
  return record!;
}

/** Hands a token to another active administrator; the token keeps its secret, role and categories. */
export async function reassignToken(
  id: number,
  input: ReassignTokenInput,
  actor: Actor,
  ip?: string,
): Promise<ApiTokenRecord> {
  const token = await ApiToken.findByPk(id);
  if (!token) throw AppError.notFound('The token');
  if (token.revokedAt)
    throw new AppError('conflict', 'This token is revoked; it cannot be handed to anyone.', 409);
  const target = await User.findByPk(input.userId, { attributes: ['id', 'role', 'active', 'email'] });
  if (!target || !target.active || target.role !== 'admin')
    throw new AppError('bad_request', 'A token can only be handed to an active administrator.', 400);
  const from = token.createdBy;
  await token.update({ createdBy: target.id });
  await recordAudit({
    actor,
    action: 'token.reassigned',
    targetType: 'api_token',
    targetId: token.id,
    details: { name: token.name, prefix: token.prefix, fromUserId: from, toUserId: target.id },
    ip,
  });
  const [record] = await toRecords([token]);
  return record!;
}

/** The caller behind an `Authorization: Bearer` secret; 401 for an unknown or revoked token. */
export async function authenticateToken(secret: string): Promise<Actor> {
  if (!secret.startsWith(tokenSecretPrefix))
    throw AppError.unauthenticated(
      `That is not a Ballast API token (they start with "${tokenSecretPrefix}").`,
    );
  const token = await ApiToken.findOne({ where: { tokenHash: sha256(secret) } });
  if (!token)
    throw AppError.unauthenticated(
      'This API token is not known to Ballast. Ask an administrator for a new one.',
    );
  if (token.revokedAt)
    throw AppError.unauthenticated(
      `This API token (${token.prefix}…) was revoked on ${token.revokedAt.toISOString().slice(0, 10)}. Ask an administrator for a new one.`,
    );
  // A token stops while the administrator who answers for it is disabled, and works again on re-enabling;
  // revoking is the way to end it for good. Tokens made from the command line have no creator.
  if (token.createdBy !== null) {
    const creator = await User.findByPk(token.createdBy, { attributes: ['active'] });
    if (!creator?.active)
      throw AppError.unauthenticated(
        `This API token (${token.prefix}…) is stopped because the person who created it is disabled. Ask an administrator to hand it to another administrator, or for a new one.`,
      );
  }
  const now = new Date();
  if (!token.lastUsedAt || now.getTime() - token.lastUsedAt.getTime() >= lastUsedEveryMs) {
    await ApiToken.update(
      { lastUsedAt: now },
      {
        where: {
          id: token.id,
          [Op.or]: [
            { lastUsedAt: null },
            { lastUsedAt: { [Op.lt]: new Date(now.getTime() - lastUsedEveryMs) } },
          ],
        },
      },
    );
  }
  return {
    kind: 'token',
    id: token.id,
    email: `token:${token.prefix}`,
    name: token.name,
    role: token.role,
    // A manager token without categories reaches none rather than all.
    categoryIds: token.role === 'manager' ? (token.categoryIds ?? []) : token.categoryIds,
  };
}
