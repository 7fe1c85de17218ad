import { QueryTypes } from 'sequelize';
import {
  alertRuleDefaults,
  alertRules,
  type AlertRule,
  type AlertRuleSetting,
  type SetAlertRuleInput,
} from '../../../shared/schemas/alerts.schema';
import { alertRuleName } from '../../../shared/vocabulary';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';

type Row = {
  rule: string;
  enabled: number;
  threshold: number | null;
  daily_limit: number;
  updated_by: string | null;
};

/** The rules of a category as they apply: its own choices over the defaults, in the order of alertRules. */
export async function categoryRules(categoryId: number): Promise<AlertRuleSetting[]> {
  const rows = await db().query<Row>(
    'SELECT rule, enabled, threshold, daily_limit, updated_by FROM alert_rules WHERE category_id = :categoryId',
    { replacements: { categoryId }, type: QueryTypes.SELECT },
  );
  const byRule = new Map(rows.map((r) => [r.rule, r]));
  return alertRules.map((rule) => {
    const d = alertRuleDefaults[rule];
    const row = byRule.get(rule);
    const threshold = d.threshold === null ? null : (row?.threshold ?? d.threshold);
    return {
      rule,
      name: alertRuleName(rule, threshold),
      enabled: row ? Boolean(row.enabled) : d.enabled,
      threshold,
      dailyLimit: row ? Number(row.daily_limit) : d.dailyLimit,
      isDefault: !row,
      updatedBy: row?.updated_by ?? null,
    };
  });
}

export function isAlertRule(value: string): value is AlertRule {
  return (alertRules as readonly string[]).includes(value);
}

/** Changes one rule of a category; the audit log keeps the before and after. */
export async function setCategoryRule(
  category: { id: number; slug: string },
  rule: string,
  input: SetAlertRuleInput,
  actor: Actor,
  ip?: string,
): Promise<AlertRuleSetting[]> {
  if (!isAlertRule(rule)) throw AppError.notFound('The alert rule');
  const d = alertRuleDefaults[rule];
  if (d.threshold === null && input.threshold !== undefined && input.threshold !== null) {
    throw new AppError('bad_request', `${alertRuleName(rule, null)} has no threshold to set.`, 400);
  }
  const before = (await categoryRules(category.id)).find((r) => r.rule === rule)!;
  const threshold = d.threshold === null ? null : (input.threshold ?? before.threshold);
  await db().query(
    `INSERT INTO alert_rules (category_id, rule, enabled, threshold, daily_limit, updated_by, created_at, updated_at)
     VALUES (:categoryId, :rule, :enabled, :threshold, :dailyLimit, :by, NOW(), NOW())
     ON DUPLICATE KEY UPDATE enabled = VALUES(enabled), threshold = VALUES(threshold),
       daily_limit = VALUES(daily_limit), updated_by = VALUES(updated_by), updated_at = NOW()`,
    {
      replacements: {
        categoryId: category.id,
        rule,
        enabled: input.enabled,
        threshold,
        dailyLimit: input.dailyLimit,
        by: actor.email,
      },
    },
  );
  await recordAudit({
    actor,
    action: 'alerts.rule_changed',
    targetType: 'category',
    targetId: category.slug,
    details: {
      rule,
      before: { enabled: before.enabled, threshold: before.threshold, dailyLimit: before.dailyLimit },
      after: { enabled: input.enabled, threshold, dailyLimit: input.dailyLimit },
    },
    ip,
  });
  return categoryRules(category.id);
}

/** Puts one rule of a category back to its default (audit-logged). */
export async function resetCategoryRule(
  category: { id: number; slug: string },
  rule: string,
  actor: Actor,
  ip?: string,
): Promise<AlertRuleSetting[]> {
  if (!isAlertRule(rule)) throw AppError.notFound('The alert rule');
  await db().query('DELETE FROM alert_rules WHERE category_id = :categoryId AND rule = :rule', {
    replacements: { categoryId: category.id, rule },
  });
  await recordAudit({
    actor,
    action: 'alerts.rule_reset',
    targetType: 'category',
    targetId: category.slug,
    details: { rule, after: alertRuleDefaults[rule] },
    ip,
  });
  return categoryRules(category.id);
}
