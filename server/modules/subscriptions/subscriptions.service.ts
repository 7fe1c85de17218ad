import { createHmac, timingSafeEqual } from 'node:crypto';
import type {
  SetSubscriptionInput,
  Subscription,
  UnsubscribeInfo,
  UnsubscribeResult,
} from '../../../shared/schemas/digests.schema';
import { loadConfig } from '../../config/env';
import { Category, CategoryOwner, DigestSubscription, MailDelivery, User } from '../../db/models';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';

/**
 * Who receives a digest. Without an explicit choice, the managers who own a category receive its digest
 * and executives receive the portfolio digest; a row in digest_subscriptions (made in the web app or by an
 * unsubscribe link) overrides that default for one address and one digest. Extra recipients of a schedule
 * are added unless their address has unsubscribed from that digest.
 */
export const categoryTarget = (categoryId: number): string => `category:${categoryId}`;
export const portfolioTarget = 'portfolio';

async function choices(target: string): Promise<Map<string, boolean>> {
  const rows = await DigestSubscription.findAll({ where: { target }, attributes: ['email', 'subscribed'] });
  return new Map(rows.map((r) => [r.email.toLowerCase(), r.subscribed]));
}

async function categoryOwners(categoryId: number): Promise<string[]> {
  const owners = await CategoryOwner.findAll({ where: { categoryId }, attributes: ['userId'] });
  if (owners.length === 0) return [];
  const users = await User.findAll({
    where: { id: owners.map((o) => o.userId), active: true, role: 'manager' },
    attributes: ['email'],
  });
  return users.map((u) => u.email.toLowerCase());
}

async function defaultPortfolioReaders(): Promise<string[]> {
  const users = await User.findAll({ where: { role: 'exec', active: true }, attributes: ['email'] });
  return users.map((u) => u.email.toLowerCase());
}

function resolve(defaults: string[], extra: string[], choice: Map<string, boolean>): string[] {
  const out = new Set<string>();
  for (const email of defaults) if (choice.get(email) !== false) out.add(email);
  for (const [email, subscribed] of choice) if (subscribed && defaults.includes(email)) out.add(email);
  for (const raw of extra) {
    const email = raw.trim().toLowerCase();
    if (email && choice.get(email) !== false) out.add(email);
  }
  return [...out].sort();
}

export async function categoryRecipients(categoryId: number, extra: string[] = []): Promise<string[]> {
  const target = categoryTarget(categoryId);
  return resolve(await categoryOwners(categoryId), extra, await choices(target));
}

export async function portfolioRecipients(extra: string[] = []): Promise<string[]> {
  return resolve(await defaultPortfolioReaders(), extra, await choices(portfolioTarget));
}

async function setChoice(
  email: string,
  target: string,
  subscribed: boolean,
  source: 'web' | 'link',
): Promise<void> {
  await db().query(
    `INSERT INTO digest_subscriptions (email, target, subscribed, source, created_at, updated_at)
     VALUES (:email, :target, :subscribed, :source, NOW(), NOW())
     ON DUPLICATE KEY UPDATE subscribed = VALUES(subscribed), source = VALUES(source), updated_at = NOW()`,
    { replacements: { email: email.toLowerCase(), target, subscribed, source } },
  );
}

/** The digests the caller may subscribe to: a manager's own categories, the portfolio for executives. */
export async function listSubscriptions(actor: Actor): Promise<Subscription[]> {
  const email = actor.email.toLowerCase();
  const out: Subscription[] = [];
  if (actor.role === 'manager') {
    const ids = actor.categoryIds ?? [];
    const categories = ids.length
      ? await Category.findAll({
          where: { id: ids },
          attributes: ['id', 'slug', 'name'],
          order: [['name', 'ASC']],
        })
      : [];
    const rows = await DigestSubscription.findAll({
      where: { email, target: categories.map((c) => categoryTarget(c.id)) },
    });
    const byTarget = new Map(rows.map((r) => [r.target, r.subscribed]));
    for (const c of categories) {
      const choice = byTarget.get(categoryTarget(c.id));
      out.push({
        target: categoryTarget(c.id),
        label: c.name,
        categorySlug: c.slug,
        subscribed: choice ?? true,
        byDefault: choice === undefined,
      });
    }
  }
  if (actor.role === 'exec') {
    const row = await DigestSubscription.findOne({ where: { email, target: portfolioTarget } });
    out.push({
      target: portfolioTarget,
      label: 'Portfolio digest (every category)',
      categorySlug: null,
      subscribed: row?.subscribed ?? true,
      byDefault: !row,
    });
  }
  return out;
}

export async function setSubscription(
  actor: Actor,
  input: SetSubscriptionInput,
  ip?: string,
): Promise<Subscription[]> {
  const allowed = await listSubscriptions(actor);
  if (!allowed.some((s) => s.target === input.target)) {
    throw AppError.forbidden(
      'You can subscribe only to the digests of your own categories (or the portfolio, as an executive).',
    );
  }
  await setChoice(actor.email, input.target, input.subscribed, 'web');
  await recordAudit({
    actor,
    action: input.subscribed ? 'digest.subscribed' : 'digest.unsubscribed',
    targetType: 'digest_subscription',
    targetId: input.target,
    ip,
  });
  return listSubscriptions(actor);
}

/* Signed unsubscribe links: one per delivery, usable once. */

function sign(deliveryId: number): string {
  const secret = loadConfig().mail.unsubscribeSecret;
  return createHmac('sha256', secret).update(`unsubscribe:${deliveryId}`).digest('base64url').slice(0, 32);
}

export function unsubscribeToken(deliveryId: number): string {
  return `${deliveryId}.${sign(deliveryId)}`;
}

async function deliveryFor(token: string): Promise<MailDelivery> {
  const [idText, mac] = token.split('.');
  const id = Number(idText);
  const expected = Number.isInteger(id) && id > 0 ? sign(id) : '';
  const ok =
    !!mac && expected.length === mac.length && timingSafeEqual(Buffer.from(expected), Buffer.from(mac));
  if (!ok)
    throw new AppError(
      'bad_request',
      'This unsubscribe link is not valid. Check that it was copied whole.',
      400,
    );
  const delivery = await MailDelivery.findByPk(id);
  if (!delivery) throw AppError.notFound('The mail this link came from');
  return delivery;
}

async function targetLabel(target: string): Promise<string> {
  if (target === portfolioTarget) return 'the portfolio digest';
  const category = await Category.findByPk(Number(target.split(':')[1]), { attributes: ['name'] });
  return category ? `the weekly digest of ${category.name}` : 'a category digest';
}

export async function unsubscribeInfo(token: string): Promise<UnsubscribeInfo> {
  const delivery = await deliveryFor(token);
  const row = await DigestSubscription.findOne({
    where: { email: delivery.recipient, target: delivery.target },
  });
  return {
    email: delivery.recipient,
    label: await targetLabel(delivery.target),
    used: delivery.unsubscribedAt !== null,
    usedAt: delivery.unsubscribedAt?.toISOString() ?? null,
    subscribed: row?.subscribed ?? true,
  };
}

/** Turns the digest of the link off for its recipient; a second use changes nothing and says so. */
export async function unsubscribeWithToken(token: string, now = new Date()): Promise<UnsubscribeResult> {
  const delivery = await deliveryFor(token);
  const label = await targetLabel(delivery.target);
  const [claimed] = await MailDelivery.update(
    { unsubscribedAt: now },
    { where: { id: delivery.id, unsubscribedAt: null } },
  );
  if (claimed !== 1) {
    return {
      outcome: 'already_used',
      email: delivery.recipient,
      label,
      message: `This link was already used on ${(delivery.unsubscribedAt ?? now).toISOString().slice(0, 10)}; ${delivery.recipient} no longer receives ${label}. To receive it again, sign in to Ballast and open My digests.`,
    };
  }
  await setChoice(delivery.recipient, delivery.target, false, 'link');
  await recordAudit({
    actorEmail: delivery.recipient,
    action: 'digest.unsubscribed',
    targetType: 'digest_subscription',
    targetId: delivery.target,
    details: { via: 'link', deliveryId: delivery.id },
  });
  return {
    outcome: 'unsubscribed',
    email: delivery.recipient,
    label,
    message: `${delivery.recipient} will no longer receive ${label}. This link has now been used; to subscribe again, sign in to Ballast and open My digests.`,
  };
}
