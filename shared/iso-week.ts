/**
 * ISO 8601 weeks in UTC: weeks start on Monday, and week 1 is the week holding the year's first Thursday.
 * Ballast labels snapshots by ISO week ('2026-W48'); a week's cut-off is the Monday 00:00 UTC after it.
 */
const DAY_MS = 86_400_000;
const WEEK_MS = 7 * DAY_MS;
const pattern = /^(\d{4})-W(\d{2})$/;

export type IsoWeek = { year: number; week: number };

export function isIsoWeekLabel(label: string): boolean {
  const m = pattern.exec(label);
  if (!m) return false;
  const year = Number(m[1]);
  const week = Number(m[2]);
  return week >= 1 && week <= weeksInIsoYear(year);
}

function mondayOfWeekOne(year: number): number {
  const jan4 = Date.UTC(year, 0, 4);
  const weekday = (new Date(jan4).getUTCDay() + 6) % 7; // Monday = 0
  return jan4 - weekday * DAY_MS;
}

export function weeksInIsoYear(year: number): number {
  return Math.round((mondayOfWeekOne(year + 1) - mondayOfWeekOne(year)) / WEEK_MS);
}

export function isoWeekOf(date: Date): IsoWeek {
  const day = Date.UTC(date.getUTCFullYear(), date.getUTCMonth(), date.getUTCDate());
  const weekday = (new Date(day).getUTCDay() + 6) % 7;
  const thursday = day + (3 - weekday) * DAY_MS;
  const year = new Date(thursday).getUTCFullYear();
  return { year, week: Math.floor((thursday - mondayOfWeekOne(year)) / WEEK_MS) + 1 };
}

export function formatIsoWeek({ year, week }: IsoWeek): string {
  return `${year}-W${String(week).padStart(2, '0')}`;
}

export function parseIsoWeek(label: string): IsoWeek {
  const m = pattern.exec(label);
  if (!m || !isIsoWeekLabel(label)) throw new Error(`"${label}" is not an ISO week such as 2026-W48.`);
  return { year: Number(m[1]), week: Number(m[2]) };
}

/** Monday 00:00 UTC that starts the week. */
export function isoWeekStart(label: string): Date {
  const { year, week } = parseIsoWeek(label);
  return new Date(mondayOfWeekOne(year) + (week - 1) * WEEK_MS);
}

/** Monday 00:00 UTC after the week: the cut-off of that week's snapshot. */
export function isoWeekEnd(label: string): Date {
  return new Date(isoWeekStart(label).getTime() + WEEK_MS);
}

export function isoWeekLabel(date: Date): string {
  return formatIsoWeek(isoWeekOf(date));
}

export function shiftIsoWeek(label: string, weeks: number): string {
  return isoWeekLabel(new Date(isoWeekStart(label).getTime() + weeks * WEEK_MS));
}

/** The latest week that has ended at `now`: the default week of a snapshot. */
export function lastCompletedIsoWeek(now: Date): string {
  return shiftIsoWeek(isoWeekLabel(now), -1);
}

/** Every week label from `from` to `to`, both included. */
export function isoWeekRange(from: string, to: string): string[] {
  const weeks: string[] = [];
  for (let t = isoWeekStart(from).getTime(); t <= isoWeekStart(to).getTime(); t += WEEK_MS) {
    weeks.push(isoWeekLabel(new Date(t)));
  }
  return weeks;
}

/*
 * The one week boundary. A week's evidence is what was reviewed strictly before the end of its ISO week in
 * UTC, the Monday 00:00:00 UTC after it: a review at Sunday 23:59:59 UTC counts in that week, one at Monday
 * 00:00:00 UTC counts from the next week on. The same strictness holds for any cut-off (a what-if, a score
 * request's asOf), and a window of D days before a cut-off holds what was reviewed strictly after
 * cut-off − D days. The engine (shared/scoring/summary.ts) decides with the functions and the SQL
 * (server/modules/snapshots/snapshot-evidence.ts) with the fragments below; tests hold the two together.
 */

/** The cut-off of a week's evidence: Monday 00:00:00 UTC after the week. */
export function weekCutoff(label: string): Date {
  return isoWeekEnd(label);
}

/** Whether something reviewed at `reviewedAt` is evidence at `cutoff` (strictly before it). */
export function isEvidenceBefore(reviewedAt: Date | number, cutoff: Date | number): boolean {
  return +reviewedAt < +cutoff;
}

/** The start of a window of `days` days that ends at `cutoff`; the start itself is outside the window. */
export function windowStart(cutoff: Date | number, days: number): Date {
  return new Date(+cutoff - days * DAY_MS);
}

/** Whether evidence reviewed at `reviewedAt` falls in the `days` days before `cutoff`. */
export function isInWindow(reviewedAt: Date | number, cutoff: Date | number, days: number): boolean {
  return +reviewedAt > windowStart(cutoff, days).getTime();
}

/** SQL for `isEvidenceBefore`: `column` against the named replacement holding the cut-off. */
export function evidenceBeforeSql(column: string, cutoffParam = 'cutoff'): string {
  return `${column} < :${cutoffParam}`;
}

/** SQL for `isInWindow`: `column` against the named replacement holding `windowStart(cutoff, days)`. */
export function inWindowSql(column: string, fromParam: string): string {
  return `${column} > :${fromParam}`;
}
