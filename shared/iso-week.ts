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
