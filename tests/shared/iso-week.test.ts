import { getISOWeek, getISOWeekYear } from 'date-fns';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  isoWeekEnd,
  isoWeekLabel,
  isoWeekRange,
  isoWeekStart,
  lastCompletedIsoWeek,
  shiftIsoWeek,
  weeksInIsoYear,
} from '../../shared/iso-week';

describe('ISO weeks', () => {
  // Worked examples of ISO 8601 week dates (the standard's own rules: Monday start, week with Jan 4th is week 1).
  it('labels the year-boundary dates as ISO 8601 does', () => {
    expect(isoWeekLabel(new Date('2005-01-01T12:00:00Z'))).toBe('2004-W53'); // a Saturday
    expect(isoWeekLabel(new Date('2007-12-31T00:00:00Z'))).toBe('2008-W01'); // a Monday
    expect(isoWeekLabel(new Date('2010-01-03T23:59:59Z'))).toBe('2009-W53'); // a Sunday
    expect(isoWeekLabel(new Date('2026-11-30T08:00:00Z'))).toBe('2026-W49');
    expect(weeksInIsoYear(2026)).toBe(53);
    expect(weeksInIsoYear(2025)).toBe(52);
  });

  it('agrees with date-fns on random instants (date-fns read in a UTC process)', () => {
    // date-fns works in the process time zone; the test run sets none, so compare only when it is UTC.
    const utc = new Date('2026-01-01T00:00:00Z').getTimezoneOffset() === 0;
    fc.assert(
      fc.property(
        fc.date({ min: new Date('1990-01-01Z'), max: new Date('2060-01-01Z'), noInvalidDate: true }),
        (d) => {
          const label = isoWeekLabel(d);
          if (utc) expect(label).toBe(`${getISOWeekYear(d)}-W${String(getISOWeek(d)).padStart(2, '0')}`);
          expect(isoWeekStart(label).getTime()).toBeLessThanOrEqual(d.getTime());
          expect(isoWeekEnd(label).getTime()).toBeGreaterThan(d.getTime());
        },
      ),
    );
  });

  it('shifts, ranges and picks the last completed week', () => {
    expect(shiftIsoWeek('2026-W01', -1)).toBe('2025-W52');
    expect(shiftIsoWeek('2026-W53', 1)).toBe('2027-W01');
    expect(isoWeekRange('2025-W51', '2026-W02')).toEqual(['2025-W51', '2025-W52', '2026-W01', '2026-W02']);
    expect(lastCompletedIsoWeek(new Date('2026-11-30T06:00:00Z'))).toBe('2026-W48');
    expect(isoWeekEnd('2026-W48').toISOString()).toBe('2026-11-30T00:00:00.000Z');
  });
});
