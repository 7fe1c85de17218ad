import { QueryTypes } from 'sequelize';
import { db } from '../../db/sequelize';
import { queueWebhookDeliveries } from '../webhooks/webhooks.service';

/**
 * The people who receive one rule of one category: an explicit choice in alert_subscriptions wins;
 * without one, the managers who own the category receive it and nobody else does. A manager never
 * receives alerts of a category they do not own (they could not open the item).
 */
export async function alertRecipients(categoryId: number, rule: string): Promise<number[]> {
  const rows = await db().query<{ id: number }>(
    `SELECT u.id FROM users u
     LEFT JOIN alert_subscriptions s ON s.user_id = u.id AND s.category_id = :categoryId AND s.rule = :rule
     LEFT JOIN category_owners o ON o.user_id = u.id AND o.category_id = :categoryId
     WHERE u.active = 1 AND (u.role <> 'manager' OR o.user_id IS NOT NULL)
       AND COALESCE(s.subscribed, u.role = 'manager' AND o.user_id IS NOT NULL) = 1
     ORDER BY u.id`,
    { replacements: { categoryId, rule }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => Number(r.id));
}

/** Hands new alerts to their readers (waiting for the next alert mail) and to every enabled webhook. */
export async function fanOut(alertIds: number[], now: Date): Promise<void> {
  const alerts = await db().query<{ id: number; category_id: number; rule: string }>(
    'SELECT id, category_id, rule FROM alerts WHERE id IN (:ids)',
    { replacements: { ids: alertIds }, type: QueryTypes.SELECT },
  );
  for (const a of alerts) {
    for (const userId of await alertRecipients(Number(a.category_id), a.rule)) {
      await db().query(
        `INSERT IGNORE INTO alert_recipients (alert_id, user_id, status, alert_mail_id, settled_at, created_at)
         VALUES (:alertId, :userId, 'waiting', NULL, NULL, :now)`,
        { replacements: { alertId: a.id, userId, now } },
      );
    }
  }
  await queueWebhookDeliveries(alertIds, now);
}
