import { describe, expect, it } from 'vitest';
import { parseInstant, readInstant } from '../../shared/clock';
import { isEvidenceBefore, isInWindow, weekCutoff } from '../../shared/iso-week';
import { resolveSettings, summariseReviews } from '../../shared/scoring';

// ISO 8601-1:2019 (dates, times, UTC offsets) and the ISO week rule (week 1 holds the first Thursday).
describe('the one clock', () => {
  it.each([
    ['2026-11-30', '2026-11-30T00:00:00.000Z'],
    ['2026-11-30T05:00:00', '2026-11-30T05:00:00.000Z'],
    ['2026-11-30 05:00', '2026-11-30T05:00:00.000Z'],
    ['2026-11-30T18:00:00+13:00', '2026-11-30T05:00:00.000Z'],
    ['2024-02-29T23:59:59.999Z', '2024-02-29T23:59:59.999Z'],
  ])('reads %j as %s whatever the process zone', (text, iso) => {
    expect(parseInstant(text)?.toISOString()).toBe(iso);
  });

  it.each([
    ['2026-02-30', '2026-02-30 is not a day in the calendar'],
    ['2026-13-01', '2026-13-01 is not a day in the calendar'],
    ['2025-02-29T10:00:00Z', '2025-02-29 is not a day in the calendar'],
    ['2026-11-30T24:00:00', '24:00:00 is not a time of day (00:00:00 to 23:59:59)'],
    ['2026-11-30T10:60', '10:60 is not a time of day (00:00:00 to 23:59:59)'],
    ['30/11/2026', 'is not a date in the form YYYY-MM-DD or YYYY-MM-DDTHH:mm:ssZ'],
  ])('refuses %j: %s', (text, reason) => {
    expect(readInstant(text)).toEqual({ ok: false, reason });
  });
});

describe('the one week boundary', () => {
  const cutoff = weekCutoff('2026-W48');
  it('ends 2026-W48 at Monday 30 November 00:00:00 UTC and keeps only what came strictly before', () => {
    expect(cutoff.toISOString()).toBe('2026-11-30T00:00:00.000Z');
    expect(isEvidenceBefore(new Date('2026-11-29T23:59:59Z'), cutoff)).toBe(true);
    expect(isEvidenceBefore(new Date('2026-11-30T00:00:00Z'), cutoff)).toBe(false);
    expect(isEvidenceBefore(new Date('2026-11-30T00:00:01Z'), cutoff)).toBe(false);
  });

  it('opens a window of D days just after cut-off − D days', () => {
    const start = Date.parse('2026-09-01T00:00:00Z'); // 90 days before the cut-off
    expect([start - 1000, start, start + 1000].map((t) => isInWindow(t, cutoff, 90))).toEqual([
      false,
      false,
      true,
    ]);
  });

  it('makes the engine leave out a review at the cut-off itself, from n and from every window', () => {
    const s = resolveSettings({});
    const summary = summariseReviews(
      [
        { stars: 5, reviewedAt: '2026-11-29T23:59:59Z' },
        { stars: 1, reviewedAt: '2026-11-30T00:00:00Z' },
        { stars: 1, reviewedAt: '2026-11-30T00:00:01Z' },
      ],
      '2026-11-30',
      s,
    );
    expect([summary.n, summary.recentCount, summary.totalRecent, summary.oneStarRecent]).toEqual([
      1, 1, 1, 0,
    ]);
  });

  it('reads an offset-less review time as UTC in the engine', () => {
    const s = resolveSettings({});
    const summary = summariseReviews(
      [{ stars: 4, reviewedAt: '2026-11-29T23:59:59' }],
      '2026-11-30T00:00:00',
      s,
    );
    expect(summary.n).toBe(1);
    expect(summary.newestAt).toBe('2026-11-29T23:59:59.000Z');
  });
});
