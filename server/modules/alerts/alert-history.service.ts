import { QueryTypes } from 'sequelize';
import {
  alertRuleDefaults,
  alertRules,
  type AlertChoice,
  type AlertEvidence,
  type AlertList,
  type AlertListQuery,
  type AlertPreferences,
  type AlertRecord,
  type AlertRule,
  type MyAlertSettings,
  type SetAlertChoiceInput,
} from '../../../shared/schemas/alerts.schema';
import { alertRuleName } from '../../../shared/vocabulary';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { categoryRules } from './alert-rules.service';
import { minuteOf, preferencesOf } from './alert-mail.service';

type Row = {
  id: number;
  rule: AlertRule;
  category_id: number;
  category_slug: string;
  category_name: string;
  sku: string;
  item_title: string | null;
  iso_week: string;
  source: 'import' | 'snapshot' | 'daily';
  import_batch_id: number | null;
  snapshot_id: number | null;
  headline: string;
  evidence: string | AlertEvidence;
  raised_at: Date;
  threshold: number | null;
  mail: 'waiting' | 'mailed' | 'held' | null;
};

function toRecord(r: Row): AlertRecord {
  const d = alertRuleDefaults[r.rule];
  const threshold = d.threshold === null ? null : (r.threshold ?? d.threshold);
  return {
    id: Number(r.id),
    rule: r.rule,
    ruleName: alertRuleName(r.rule, threshold),
    categoryId: Number(r.category_id),
    categorySlug: r.category_slug,
    categoryName: r.category_name,
    sku: r.sku,
    itemTitle: r.item_title,
    isoWeek: r.iso_week,
    source: r.source,
    importBatchId: r.import_batch_id === null ? null : Number(r.import_batch_id),
    snapshotId: r.snapshot_id === null ? null : Number(r.snapshot_id),
    headline: r.headline,
    evidence: (typeof r.evidence === 'string' ? JSON.parse(r.evidence) : r.evidence) as AlertEvidence,
    raisedAt: new Date(r.raised_at).toISOString(),
    mail: r.mail ?? null,
  };
}

const select = (
  mailColumn: string,
) => `SELECT a.id, a.rule, a.category_id, c.slug AS category_slug, c.name AS category_name,
    a.sku, i.title AS item_title, a.iso_week, a.source, a.import_batch_id, a.snapshot_id, a.headline, a.evidence,
    a.raised_at, r.threshold, ${mailColumn} AS mail
  FROM alerts a JOIN categories c ON c.id = a.category_id LEFT JOIN items i ON i.id = a.item_id
  LEFT JOIN alert_rules r ON r.category_id = a.category_id AND r.rule = a.rule`;

async function page(
  from: string,
  where: string,
  replacements: Record<string, unknown>,
  query: AlertListQuery,
  mail: string,
): Promise<AlertList> {
  const ruleWhere = query.rule ? ' AND a.rule = :rule' : '';
  const all = {
    ...replacements,
    rule: query.rule ?? null,
    limit: query.pageSize,
    offset: (query.page - 1) * query.pageSize,
  };
  const rows = await db().query<Row>(
    `${select(mail)} ${from} WHERE ${where}${ruleWhere} ORDER BY a.raised_at DESC, a.id DESC LIMIT :limit OFFSET :offset`,
    { replacements: all, type: QueryTypes.SELECT },
  );
  const [count] = await db().query<{ n: number }>(
    `SELECT COUNT(*) AS n FROM alerts a ${from} WHERE ${where}${ruleWhere}`,
    { replacements: all, type: QueryTypes.SELECT },
  );
  return { items: rows.map(toRecord), total: Number(count?.n ?? 0) };
}

/** Every alert of a category, newest first. */
export function categoryAlerts(categoryId: number, query: AlertListQuery): Promise<AlertList> {
  return page('', 'a.category_id = :categoryId', { categoryId }, query, 'NULL');
}

/** The alerts raised for one person, with what became of each (mailed, waiting, held by the daily limit). */
export function myAlerts(actor: Actor, query: AlertListQuery): Promise<AlertList> {
  if (actor.kind !== 'user')
    throw new AppError('forbidden', 'Alert history belongs to a person, not a token.', 403);
  return page(
    'JOIN alert_recipients ar ON ar.alert_id = a.id AND ar.user_id = :userId',
    '1 = 1',
    { userId: actor.id },
    query,
    'ar.status',
  );
}

async function visibleCategories(actor: Actor): Promise<{ id: number; name: string }[]> {
  const rows = await db().query<{ id: number; name: string }>(
    'SELECT id, name FROM categories ORDER BY name',
    {
      type: QueryTypes.SELECT,
    },
  );
  if (actor.role === 'manager') return rows.filter((c) => actor.categoryIds?.includes(Number(c.id)));
  return rows;
}

export async function myAlertSettings(actor: Actor): Promise<MyAlertSettings> {
  if (actor.kind !== 'user')
    throw new AppError('forbidden', 'Alert settings belong to a person, not a token.', 403);
  const categories = await visibleCategories(actor);
  const subs = await db().query<{ category_id: number; rule: string; subscribed: number }>(
    'SELECT category_id, rule, subscribed FROM alert_subscriptions WHERE user_id = :userId',
    { replacements: { userId: actor.id }, type: QueryTypes.SELECT },
  );
  const choice = new Map(subs.map((s) => [`${s.category_id}|${s.rule}`, Boolean(s.subscribed)]));
  const choices: AlertChoice[] = [];
  for (const c of categories) {
    const rules = await categoryRules(Number(c.id));
    const owner = actor.role === 'manager' && (actor.categoryIds ?? []).includes(Number(c.id));
    for (const r of rules) {
      const explicit = choice.get(`${c.id}|${r.rule}`);
      choices.push({
        categoryId: Number(c.id),
        categoryName: c.name,
        rule: r.rule,
        ruleName: r.name,
        ruleEnabled: r.enabled,
        subscribed: explicit ?? owner,
        isDefault: explicit === undefined,
      });
    }
  }
  return { preferences: await preferencesOf(actor.id), choices };
}

export async function setAlertChoice(
  actor: Actor,
  input: SetAlertChoiceInput,
  ip?: string,
): Promise<MyAlertSettings> {
  if (actor.kind !== 'user')
    throw new AppError('forbidden', 'Alert settings belong to a person, not a token.', 403);
  if (!(await visibleCategories(actor)).some((c) => Number(c.id) === input.categoryId)) {
    throw new AppError('forbidden', 'You can only receive alerts of categories you can open.', 403);
  }
  if (!(alertRules as readonly string[]).includes(input.rule)) throw AppError.notFound('The alert rule');
  await db().query(
    `INSERT INTO alert_subscriptions (user_id, category_id, rule, subscribed, created_at, updated_at)
     VALUES (:userId, :categoryId, :rule, :subscribed, NOW(), NOW())
     ON DUPLICATE KEY UPDATE subscribed = VALUES(subscribed), updated_at = NOW()`,
    { replacements: { userId: actor.id, ...input } },
  );
  await recordAudit({
    actor,
    action: input.subscribed ? 'alerts.subscribed' : 'alerts.unsubscribed',
    targetType: 'category',
    targetId: input.categoryId,
    details: { rule: input.rule },
    ip,
  });
  return myAlertSettings(actor);
}

export async function setAlertPreferences(
  actor: Actor,
  input: AlertPreferences,
  ip?: string,
): Promise<MyAlertSettings> {
  if (actor.kind !== 'user')
    throw new AppError('forbidden', 'Alert settings belong to a person, not a token.', 403);
  await db().query(
    `INSERT INTO alert_preferences (user_id, time_zone, quiet_from_minute, quiet_until_minute, created_at, updated_at)
     VALUES (:userId, :tz, :from, :until, NOW(), NOW())
     ON DUPLICATE KEY UPDATE time_zone = VALUES(time_zone), quiet_from_minute = VALUES(quiet_from_minute),
       quiet_until_minute = VALUES(quiet_until_minute), updated_at = NOW()`,
    {
      replacements: {
        userId: actor.id,
        tz: input.timeZone,
        from: minuteOf(input.quietFrom),
        until: minuteOf(input.quietUntil),
      },
    },
  );
  await recordAudit({
    actor,
    action: 'alerts.quiet_hours_set',
    targetType: 'user',
    targetId: actor.id,
    details: input,
    ip,
  });
  return myAlertSettings(actor);
}
