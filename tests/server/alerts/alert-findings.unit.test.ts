import { createHmac } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { alertRuleDefaults, alertRules, type AlertRuleSetting } from '../../../shared/schemas/alerts.schema';
import { newFindings } from '../../../server/modules/alerts/alert-check.service';
import { isQuiet } from '../../../server/modules/alerts/alert-mail.service';
import { signPayload, verifySignature } from '../../../server/modules/webhooks/webhook-signature';
import type { AlertItemState } from '../../../server/workers/tasks';

const rules: AlertRuleSetting[] = alertRules.map((rule) => ({
  rule,
  name: rule,
  enabled: true,
  threshold: alertRuleDefaults[rule].threshold,
  dailyLimit: alertRuleDefaults[rule].dailyLimit,
  isDefault: true,
  updatedBy: null,
}));

const item = (sku: string, rank: number, extra: Partial<AlertItemState> = {}): AlertItemState => ({
  sku,
  title: null,
  rank,
  n: 100,
  smoothed: 4,
  cluster: false,
  clusterReason: null,
  phrases: [],
  stale: false,
  staleReason: null,
  thin: false,
  ...extra,
});
const map = (...items: AlertItemState[]) => new Map(items.map((i) => [i.sku, i]));

describe('what counts as new between two checks', () => {
  it('raises a cluster only when the item was not a cluster before', () => {
    const before = map(item('A', 1), item('B', 2, { cluster: true }));
    const after = map(item('A', 1, { cluster: true }), item('B', 2, { cluster: true }));
    expect(newFindings(before, after, rules).map((c) => `${c.rule}:${c.sku}`)).toEqual(['new_cluster:A']);
  });

  it('raises a fall only above the threshold, and entering and leaving the top', () => {
    const before = map(item('A', 3), item('B', 12), item('C', 30));
    const after = map(item('A', 14), item('B', 10), item('C', 40));
    const found = newFindings(before, after, rules).map((c) => `${c.rule}:${c.sku}`);
    // A fell 11 places (> 10) and left the top 10; B entered the top 10; C fell exactly 10: not more than 10.
    expect(found.sort()).toEqual(['entered_top:B', 'fell:A', 'left_top:A']);
  });

  it('raises going stale and a thin leader, and nothing for a switched-off rule', () => {
    const before = map(item('A', 1), item('B', 2));
    const after = map(item('A', 1, { thin: true, n: 4 }), item('B', 2, { stale: true }));
    expect(
      newFindings(before, after, rules)
        .map((c) => `${c.rule}:${c.sku}`)
        .sort(),
    ).toEqual(['thin_leader:A', 'went_stale:B']);
    const off = rules.map((r) => (r.rule === 'went_stale' ? { ...r, enabled: false } : r));
    expect(newFindings(before, after, off).map((c) => c.rule)).toEqual(['thin_leader']);
  });
});

describe('quiet hours', () => {
  // EU summer time starts on the last Sunday of March at 01:00 UTC (Directive 2000/84/EC): 29 March 2026.
  const berlin = { timeZone: 'Europe/Berlin', quietFrom: '22:00', quietUntil: '07:00' };
  it('follow the wall clock across midnight and across the change to summer time', () => {
    expect(isQuiet(new Date('2026-03-28T05:30:00Z'), berlin)).toBe(true); // 06:30 CET
    expect(isQuiet(new Date('2026-03-29T05:30:00Z'), berlin)).toBe(false); // 07:30 CEST
    expect(isQuiet(new Date('2026-03-28T21:30:00Z'), berlin)).toBe(true); // 22:30 CET
    expect(isQuiet(new Date('2026-03-28T12:00:00Z'), berlin)).toBe(false);
  });
  it('are off when both times are the same', () => {
    expect(isQuiet(new Date('2026-03-28T05:30:00Z'), { ...berlin, quietUntil: '22:00' })).toBe(false);
  });
});

describe('webhook signature scheme', () => {
  // RFC 4231 test case 2: HMAC-SHA256 with key "Jefe" over "what do ya want for nothing?".
  it('is HMAC-SHA256 as published in RFC 4231', () => {
    expect(createHmac('sha256', 'Jefe').update('what do ya want for nothing?').digest('hex')).toBe(
      '5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843',
    );
  });
  it('signs "<timestamp>.<body>" and verifies only the same bytes, secret and a recent timestamp', () => {
    const body = '{"type":"ballast.alert"}';
    const sig = signPayload('s3cret', 1_800_000_000, body);
    expect(sig).toBe(`v1=${createHmac('sha256', 's3cret').update(`1800000000.${body}`).digest('hex')}`);
    const at = 1_800_000_000_000;
    expect(verifySignature(['s3cret'], '1800000000', sig, body, at)).toBe('verified');
    expect(verifySignature(['other'], '1800000000', sig, body, at)).toBe('bad_signature');
    expect(verifySignature(['s3cret'], '1800000000', sig, `${body} `, at)).toBe('bad_signature');
    expect(verifySignature(['s3cret'], '1800000000', sig, body, at + 301_000)).toBe('stale_timestamp');
    expect(verifySignature(['s3cret'], undefined, sig, body, at)).toBe('unsigned');
  });
});
