import { randomBytes } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { localMinuteOfDay } from '../../../shared/clock';
import { countOf } from '../../../shared/plural';
import {
  alertRuleDefaults,
  type AlertEvidence,
  type AlertPreferences,
  type AlertRule,
} from '../../../shared/schemas/alerts.schema';
import { alertCaution, alertRuleName } from '../../../shared/vocabulary';
import { renderAlertMail } from '../../../templates/mail/render';
import { loadConfig, type Config } from '../../config/env';
import { db } from '../../db/sequelize';
import { logger } from '../../lib/logger';
import { mailDomain } from '../mail/deliveries.service';
import type { ComposedMail } from '../mail/mail.service';
import { mailEvents } from '../mail/mail-events';
import { alertEvents } from './alert-events';

export const defaultPreferences: AlertPreferences = {
  timeZone: 'UTC',
  quietFrom: '00:00',
  quietUntil: '00:00',
};

export const minuteOf = (hhmm: string): number => Number(hhmm.slice(0, 2)) * 60 + Number(hhmm.slice(3, 5));
export const clockOf = (minute: number): string =>
  `${String(Math.floor(minute / 60)).padStart(2, '0')}:${String(minute % 60).padStart(2, '0')}`;

/**
 * Whether an instant falls in a person's quiet hours: from `quietFrom` (inclusive) to `quietUntil`
 * (exclusive), wall-clock in their time zone, across midnight when from > until; equal times mean none.
 */
export function isQuiet(now: Date, prefs: AlertPreferences): boolean {
  const from = minuteOf(prefs.quietFrom);
  const until = minuteOf(prefs.quietUntil);
  if (from === until) return false;
  const m = localMinuteOfDay(now, prefs.timeZone);
  return from < until ? m >= from && m < until : m >= from || m < until;
}

export async function preferencesOf(userId: number): Promise<AlertPreferences> {
  const [row] = await db().query<{
    time_zone: string;
    quiet_from_minute: number;
    quiet_until_minute: number;
  }>(
    'SELECT time_zone, quiet_from_minute, quiet_until_minute FROM alert_preferences WHERE user_id = :userId',
    { replacements: { userId }, type: QueryTypes.SELECT },
  );
  if (!row) return defaultPreferences;
  return {
    timeZone: row.time_zone,
    quietFrom: clockOf(Number(row.quiet_from_minute)),
    quietUntil: clockOf(Number(row.quiet_until_minute)),
  };
}

const DAY_MS = 24 * 3600_000;

export type AlertMailPass = { mails: number; mailed: number; held: number; quiet: number };

type Waiting = { alert_id: number; category_id: number; rule: string };

/**
 * Turns waiting alerts into alert mails, one per person per pass, through the mail queue. A person in
 * quiet hours keeps theirs waiting for a later pass. Of each rule of each category, a person is mailed at
 * most the rule's daily limit in any 24 hours; alerts over it are marked held (still in their history,
 * and counted in the mail).
 */
export async function flushAlertMail(now = new Date()): Promise<AlertMailPass> {
  const pass: AlertMailPass = { mails: 0, mailed: 0, held: 0, quiet: 0 };
  const users = await db().query<{ user_id: number; email: string }>(
    `SELECT DISTINCT ar.user_id, u.email FROM alert_recipients ar JOIN users u ON u.id = ar.user_id
     WHERE ar.status = 'waiting' ORDER BY ar.user_id`,
    { type: QueryTypes.SELECT },
  );
  for (const user of users) {
    const prefs = await preferencesOf(Number(user.user_id));
    if (isQuiet(now, prefs)) {
      pass.quiet += 1;
      continue;
    }
    const outcome = await db().transaction(async (transaction) => {
      const waiting = await db().query<Waiting>(
        `SELECT ar.alert_id, a.category_id, a.rule FROM alert_recipients ar JOIN alerts a ON a.id = ar.alert_id
         WHERE ar.user_id = :userId AND ar.status = 'waiting' ORDER BY a.raised_at, a.id FOR UPDATE`,
        { replacements: { userId: user.user_id }, type: QueryTypes.SELECT, transaction },
      );
      if (waiting.length === 0) return null;
      const limits = await db().query<{ category_id: number; rule: string; daily_limit: number }>(
        'SELECT category_id, rule, daily_limit FROM alert_rules WHERE category_id IN (:ids)',
        {
          replacements: { ids: [...new Set(waiting.map((w) => w.category_id))] },
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      const limitOf = new Map(limits.map((l) => [`${l.category_id}|${l.rule}`, Number(l.daily_limit)]));
      const mailedRecently = await db().query<{ category_id: number; rule: string; n: number }>(
        `SELECT a.category_id, a.rule, COUNT(*) AS n FROM alert_recipients ar JOIN alerts a ON a.id = ar.alert_id
         WHERE ar.user_id = :userId AND ar.status = 'mailed' AND ar.settled_at > :since
         GROUP BY a.category_id, a.rule`,
        {
          replacements: { userId: user.user_id, since: new Date(now.getTime() - DAY_MS) },
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      const used = new Map(mailedRecently.map((m) => [`${m.category_id}|${m.rule}`, Number(m.n)]));
      const mail: number[] = [];
      const held: number[] = [];
      for (const w of waiting) {
        const key = `${w.category_id}|${w.rule}`;
        const limit = limitOf.get(key) ?? alertRuleDefaults[w.rule as AlertRule].dailyLimit;
        const n = used.get(key) ?? 0;
        if (n < limit) {
          mail.push(w.alert_id);
          used.set(key, n + 1);
        } else held.push(w.alert_id);
      }
      let mailId: number | null = null;
      if (mail.length > 0) {
        const [insertId] = (await db().query(
          `INSERT INTO alert_mails (user_id, recipient, alert_count, held_count, created_at)
           VALUES (:userId, :email, :count, :held, :now)`,
          {
            replacements: {
              userId: user.user_id,
              email: user.email,
              count: mail.length,
              held: held.length,
              now,
            },
            type: QueryTypes.INSERT,
            transaction,
          },
        )) as unknown as [number, number];
        mailId = Number(insertId);
        await db().query(
          `UPDATE alert_recipients SET status = 'mailed', alert_mail_id = :mailId, settled_at = :now
           WHERE user_id = :userId AND alert_id IN (:ids)`,
          { replacements: { mailId, now, userId: user.user_id, ids: mail }, transaction },
        );
        await db().query(
          `INSERT INTO mail_deliveries (digest_id, alert_mail_id, recipient, target, status, attempts, next_attempt_at,
             lease_until, last_error, message_id, sent_at, unsubscribed_at, created_at, updated_at)
           VALUES (NULL, :mailId, :email, 'alerts', 'queued', 0, :now, NULL, NULL, :messageId, NULL, NULL, :now, :now)`,
          {
            replacements: {
              mailId,
              email: user.email,
              now,
              messageId: `<alerts-${mailId}.${randomBytes(9).toString('base64url')}@${mailDomain()}>`,
            },
            transaction,
          },
        );
      }
      if (held.length > 0) {
        await db().query(
          `UPDATE alert_recipients SET status = 'held', settled_at = :now WHERE user_id = :userId AND alert_id IN (:ids)`,
          { replacements: { now, userId: user.user_id, ids: held }, transaction },
        );
      }
      return { mailId, mailed: mail.length, held: held.length };
    });
    if (!outcome) continue;
    pass.mailed += outcome.mailed;
    pass.held += outcome.held;
    if (outcome.mailId) pass.mails += 1;
  }
  if (pass.mails > 0) mailEvents.emit('queued');
  return pass;
}

type MailAlertRow = {
  id: number;
  rule: AlertRule;
  sku: string;
  headline: string;
  evidence: string | AlertEvidence;
  category_name: string;
  category_slug: string;
  threshold: number | null;
};

/** The alert mail of one delivery: every alert of its batch, grouped by category, with links to the items. */
export async function composeAlertMail(
  delivery: { id: number; recipient: string; messageId: string; alertMailId: number },
  config: Config = loadConfig(),
): Promise<ComposedMail> {
  const [mail] = await db().query<{ held_count: number }>(
    'SELECT held_count FROM alert_mails WHERE id = :id',
    {
      replacements: { id: delivery.alertMailId },
      type: QueryTypes.SELECT,
    },
  );
  const rows = await db().query<MailAlertRow>(
    `SELECT a.id, a.rule, a.sku, a.headline, a.evidence, c.name AS category_name, c.slug AS category_slug, r.threshold
     FROM alert_recipients ar JOIN alerts a ON a.id = ar.alert_id JOIN categories c ON c.id = a.category_id
     LEFT JOIN alert_rules r ON r.category_id = a.category_id AND r.rule = a.rule
     WHERE ar.alert_mail_id = :mailId ORDER BY c.name, a.raised_at, a.id`,
    { replacements: { mailId: delivery.alertMailId }, type: QueryTypes.SELECT },
  );
  const base = config.publicUrl.replace(/\/$/, '');
  const groups = new Map<string, { category: string; alerts: ReturnType<typeof toLine>[] }>();
  function toLine(r: MailAlertRow) {
    const evidence = (typeof r.evidence === 'string' ? JSON.parse(r.evidence) : r.evidence) as AlertEvidence;
    const threshold =
      alertRuleDefaults[r.rule].threshold === null
        ? null
        : (r.threshold ?? alertRuleDefaults[r.rule].threshold);
    return {
      ruleName: alertRuleName(r.rule, threshold),
      headline: r.headline,
      reason: evidence.reason,
      phrases: (evidence.phrases ?? []).map((p) => `"${p.phrase}" ×${p.count}`).join(', '),
      itemUrl: `${base}/categories/${encodeURIComponent(r.category_slug)}/items/${encodeURIComponent(r.sku)}?alert=${r.id}`,
    };
  }
  for (const r of rows) {
    const g = groups.get(r.category_slug) ?? { category: r.category_name, alerts: [] };
    g.alerts.push(toLine(r));
    groups.set(r.category_slug, g);
  }
  const count = rows.length;
  const held = Number(mail?.held_count ?? 0);
  const subject = `Ballast · ${countOf(count, 'alert')}${groups.size === 1 ? ` · ${[...groups.values()][0]!.category}` : ''}`;
  const body = renderAlertMail({
    subject,
    heading: `${countOf(count, 'new alert')} since your last alert mail`,
    groups: [...groups.values()],
    held: held
      ? `${countOf(held, 'more alert')} of the same rules went over their daily limit and ${held === 1 ? 'is' : 'are'} only in your alert history.`
      : '',
    historyUrl: `${base}/alerts`,
    settingsUrl: `${base}/alerts#choices`,
    caution: alertCaution,
  });
  return {
    from: config.mail.from,
    to: delivery.recipient,
    subject,
    text: body.text,
    html: body.html,
    messageId: delivery.messageId,
    headers: { 'X-Ballast-Delivery': String(delivery.id) },
  };
}

export type AlertMailer = { stop: () => void; kick: () => void };

/** Runs alert mail passes every `everyMs` (quiet hours end by themselves) and whenever alerts are raised. */
export function startAlertMailer(options: { everyMs?: number; now?: () => Date } = {}): AlertMailer {
  let running = false;
  const pass = (): void => {
    if (running) return;
    running = true;
    flushAlertMail(options.now?.() ?? new Date())
      .catch((err: unknown) =>
        logger.error({ err: err instanceof Error ? err.message : String(err) }, 'alert mail pass failed'),
      )
      .finally(() => {
        running = false;
      });
  };
  const timer = setInterval(pass, options.everyMs ?? 60_000);
  timer.unref();
  alertEvents.on('raised', pass);
  return {
    kick: pass,
    stop: () => {
      clearInterval(timer);
      alertEvents.off('raised', pass);
    },
  };
}
