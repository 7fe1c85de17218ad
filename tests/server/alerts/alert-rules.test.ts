import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { localMinuteOfDay } from '../../../shared/clock';
import { alertRuleDefaults, alertRules } from '../../../shared/schemas/alerts.schema';
import { AuditEvent, Category, CategoryOwner, MailDelivery, User } from '../../../server/db/models';
import { db } from '../../../server/db/sequelize';
import { checkCategory } from '../../../server/modules/alerts/alert-check.service';
import { clockOf, flushAlertMail } from '../../../server/modules/alerts/alert-mail.service';
import { demoAccounts } from '../../../server/runtime/seed';
import type { AlertItemState } from '../../../server/workers/tasks';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';
import { demoWithSnapshots } from '../digests/demo-weeks';

const now = new Date('2026-12-02T12:00:00Z');
let t: TestApp;
let admin: Agent;
let manager: Agent;
let managerId: number;
let own: Category;
let other: Category;

beforeAll(async () => {
  t = await setupTestApp();
  await demoWithSnapshots(2);
  admin = await t.signIn('admin');
  manager = await t.signIn('manager');
  const email = demoAccounts.find((a) => a.role === 'manager')!.email;
  managerId = (await User.findOne({ where: { email } }))!.id;
  const owned = (await CategoryOwner.findAll({ where: { userId: managerId } })).map((o) => o.categoryId);
  own = (await Category.findByPk(owned.sort((a, b) => a - b)[0]))!;
  other = (await Category.findOne({
    where: { id: (await Category.findAll()).map((c) => c.id).filter((id) => !owned.includes(id)) },
  }))!;
}, 120_000);

afterAll(async () => t?.close());

/** Makes the next check see every item fall: the stored "before" gets the ranks in reverse. */
async function reverseStoredRanks(categoryId: number): Promise<number> {
  const [row] = await db().query<{ items: string | AlertItemState[] }>(
    'SELECT items FROM alert_states WHERE category_id = :categoryId',
    { replacements: { categoryId }, type: QueryTypes.SELECT },
  );
  const items = (typeof row!.items === 'string' ? JSON.parse(row!.items) : row!.items) as AlertItemState[];
  const size = items.length;
  const reversed = items.map((s) => ({ ...s, rank: size + 1 - s.rank }));
  await db().query('UPDATE alert_states SET items = :items WHERE category_id = :categoryId', {
    replacements: { categoryId, items: JSON.stringify(reversed) },
  });
  return size;
}

async function onlyRule(slug: string, keep: string, limit: number, threshold?: number) {
  for (const rule of alertRules) {
    await admin
      .put(`/api/categories/${slug}/alert-rules/${rule}`)
      .set('x-csrf-token', admin.csrf)
      .send({
        enabled: rule === keep,
        dailyLimit: rule === keep ? limit : 5,
        ...(rule === keep && threshold ? { threshold } : {}),
      })
      .expect(200);
  }
}

describe('alert rules of a category', () => {
  it('lists every rule with its default until a category changes it', async () => {
    const res = await manager.get(`/api/categories/${own.slug}/alert-rules`).expect(200);
    expect(res.body.map((r: { rule: string }) => r.rule)).toEqual([...alertRules]);
    const fell = res.body.find((r: { rule: string }) => r.rule === 'fell');
    expect(fell).toMatchObject({
      enabled: true,
      threshold: 10,
      dailyLimit: 5,
      isDefault: true,
      name: 'Fell more than 10 places',
    });
  });

  it('lets the category manager change a rule, audit-logs it with before and after, and reset it', async () => {
    const res = await manager
      .put(`/api/categories/${own.slug}/alert-rules/fell`)
      .set('x-csrf-token', manager.csrf)
      .send({ enabled: true, threshold: 25, dailyLimit: 2 })
      .expect(200);
    expect(res.body.find((r: { rule: string }) => r.rule === 'fell')).toMatchObject({
      threshold: 25,
      dailyLimit: 2,
      isDefault: false,
      name: 'Fell more than 25 places',
    });
    const audit = await AuditEvent.findOne({
      where: { action: 'alerts.rule_changed' },
      order: [['id', 'DESC']],
    });
    expect(audit!.details).toMatchObject({
      rule: 'fell',
      before: { threshold: 10, dailyLimit: 5 },
      after: { threshold: 25, dailyLimit: 2 },
    });
    const reset = await manager
      .delete(`/api/categories/${own.slug}/alert-rules/fell`)
      .set('x-csrf-token', manager.csrf)
      .expect(200);
    expect(reset.body.find((r: { rule: string }) => r.rule === 'fell')).toMatchObject({
      threshold: 10,
      isDefault: true,
    });
    expect(await AuditEvent.count({ where: { action: 'alerts.rule_reset' } })).toBe(1);
  });

  it('refuses a bad daily limit in words and a threshold on a rule without one', async () => {
    const bad = await manager
      .put(`/api/categories/${own.slug}/alert-rules/fell`)
      .set('x-csrf-token', manager.csrf)
      .send({ enabled: true, dailyLimit: 0 })
      .expect(400);
    expect(JSON.stringify(bad.body)).toContain('Allow at least one alert a day.');
    const none = await manager
      .put(`/api/categories/${own.slug}/alert-rules/new_cluster`)
      .set('x-csrf-token', manager.csrf)
      .send({ enabled: true, threshold: 4, dailyLimit: 3 })
      .expect(400);
    expect(none.body.error.message).toBe('New negative cluster has no threshold to set.');
    await manager
      .put(`/api/categories/${own.slug}/alert-rules/no_such_rule`)
      .set('x-csrf-token', manager.csrf)
      .send({ enabled: true, dailyLimit: 3 })
      .expect(404);
  });

  it("does not let a manager change another category's rules", async () => {
    await manager
      .put(`/api/categories/${other.slug}/alert-rules/fell`)
      .set('x-csrf-token', manager.csrf)
      .send({ enabled: false, dailyLimit: 3 })
      .expect(403);
  });
});

describe('rate limit and quiet hours of alert mail', () => {
  it('mails at most the daily limit of one rule to a person and holds the rest in their history', async () => {
    await onlyRule(own.slug, 'fell', 2, 10);
    await checkCategory(own.id, { source: 'daily' }, now);
    await flushAlertMail(now);
    await db().query("UPDATE alert_recipients SET status = 'held' WHERE status = 'waiting'");
    const size = await reverseStoredRanks(own.id);
    expect(size).toBeGreaterThan(30);
    const outcome = await checkCategory(own.id, { source: 'daily' }, now);
    expect(outcome.raised).toBeGreaterThan(2);
    const before = (await MailDelivery.max<number, MailDelivery>('id')) ?? 0;
    const pass = await flushAlertMail(now);
    expect(pass.mailed).toBeGreaterThanOrEqual(2);
    const mine = await manager.get('/api/me/alerts').query({ rule: 'fell', pageSize: 100 }).expect(200);
    const fresh = (mine.body.items as { mail: string; raisedAt: string }[]).filter(
      (a) => a.raisedAt === now.toISOString(),
    );
    expect(fresh.filter((a) => a.mail === 'mailed')).toHaveLength(2);
    expect(fresh.filter((a) => a.mail === 'held')).toHaveLength(outcome.raised - 2);
    const mails = (
      await MailDelivery.findAll({
        where: { recipient: demoAccounts.find((a) => a.role === 'manager')!.email },
      })
    ).filter((m) => m.id > before);
    expect(mails).toHaveLength(1);

    // Within the same 24 hours, another fall of the same rule waits in the history, not in a mail.
    await reverseStoredRanks(own.id);
    const later = new Date(now.getTime() + 8 * 24 * 3600_000); // next ISO week: new alert keys
    await checkCategory(own.id, { source: 'daily' }, later);
    const next = await flushAlertMail(new Date(now.getTime() + 3600_000));
    expect(next.mailed).toBe(0);
    expect(next.held).toBeGreaterThan(0);
  });

  it('stores quiet hours as wall-clock times in the person’s time zone and keeps alerts waiting through them', async () => {
    const zone = 'Pacific/Auckland';
    const local = localMinuteOfDay(now, zone);
    const from = clockOf((local + 1440 - 60) % 1440);
    const until = clockOf((local + 60) % 1440);
    const res = await manager
      .put('/api/me/alert-settings/quiet-hours')
      .set('x-csrf-token', manager.csrf)
      .send({ timeZone: zone, quietFrom: from, quietUntil: until })
      .expect(200);
    expect(res.body.preferences).toEqual({ timeZone: zone, quietFrom: from, quietUntil: until });
    const [row] = await db().query<{ time_zone: string; quiet_from_minute: number }>(
      'SELECT time_zone, quiet_from_minute FROM alert_preferences WHERE user_id = :id',
      { replacements: { id: managerId }, type: QueryTypes.SELECT },
    );
    expect(row).toMatchObject({ time_zone: zone, quiet_from_minute: (local + 1440 - 60) % 1440 });

    await onlyRule(own.slug, 'fell', 100, 10);
    await reverseStoredRanks(own.id);
    const weekAfter = new Date(now.getTime() + 15 * 24 * 3600_000);
    const sameClock = new Date(weekAfter.getTime()); // the same local time of day two weeks on (no DST change in December)
    await checkCategory(own.id, { source: 'daily' }, sameClock);
    const quiet = await flushAlertMail(sameClock);
    expect(quiet.quiet).toBeGreaterThanOrEqual(1);
    const waiting = await db().query<{ n: number }>(
      "SELECT COUNT(*) AS n FROM alert_recipients WHERE user_id = :id AND status = 'waiting'",
      { replacements: { id: managerId }, type: QueryTypes.SELECT },
    );
    expect(Number(waiting[0]!.n)).toBeGreaterThan(0);
    const after = await flushAlertMail(new Date(sameClock.getTime() + 2 * 3600_000));
    expect(after.mailed).toBeGreaterThan(0);
  });

  it('refuses a time zone it does not know and a time that is not a time, in words', async () => {
    const res = await manager
      .put('/api/me/alert-settings/quiet-hours')
      .set('x-csrf-token', manager.csrf)
      .send({ timeZone: 'Mars/Olympus', quietFrom: '25:00', quietUntil: '07:00' })
      .expect(400);
    const text = JSON.stringify(res.body);
    expect(text).toContain('Choose a time zone such as Europe/Berlin.');
    expect(text).toContain('Enter a time such as 22:00.');
  });

  it('lets a person choose which alerts they receive, only for categories they can open', async () => {
    const settings = await manager.get('/api/me/alert-settings').expect(200);
    const choice = settings.body.choices.find(
      (c: { categoryId: number; rule: string }) => c.categoryId === own.id && c.rule === 'went_stale',
    );
    expect(choice).toMatchObject({ subscribed: true, isDefault: true });
    const off = await manager
      .put('/api/me/alert-settings/choices')
      .set('x-csrf-token', manager.csrf)
      .send({ categoryId: own.id, rule: 'went_stale', subscribed: false })
      .expect(200);
    expect(
      off.body.choices.find(
        (c: { categoryId: number; rule: string }) => c.categoryId === own.id && c.rule === 'went_stale',
      ),
    ).toMatchObject({ subscribed: false, isDefault: false });
    await manager
      .put('/api/me/alert-settings/choices')
      .set('x-csrf-token', manager.csrf)
      .send({ categoryId: other.id, rule: 'went_stale', subscribed: true })
      .expect(403);
    expect(alertRuleDefaults.went_stale.enabled).toBe(true);
  });
});
