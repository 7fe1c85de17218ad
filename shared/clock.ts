import { isExists } from 'date-fns';

/**
 * Ballast's one clock: every date or date-time read from a person or a program goes through `parseInstant`.
 * - a date alone (`2026-11-30`) is 00:00:00 UTC that day;
 * - a date-time without an offset (`2026-11-30T05:00:00`) is read as UTC, never in the server's zone;
 * - an offset (`Z`, `+13:00`, `-0130`) is honoured;
 * - impossible calendar dates (2026-02-30, 2026-13-01) and times (24:00, 10:60) are refused.
 * Nothing else is accepted: `01/02/2026` means different days in different countries.
 */
const datePattern = /^(\d{4})-(\d{2})-(\d{2})$/;
const dateTimePattern =
  /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,9}))?)?(Z|[+-]\d{2}:?\d{2})?$/i;

export type InstantResult = { ok: true; date: Date } | { ok: false; reason: string };

function calendarDay(year: number, month: number, day: number): number | null {
  // date-fns checks the calendar (month lengths, leap years) without touching a time zone.
  return isExists(year, month - 1, day) ? Date.UTC(year, month - 1, day) : null;
}

/** Like `parseInstant`, with the reason a text is refused, in a person's words. */
export function readInstant(value: string): InstantResult {
  const text = value.trim();
  const dateOnly = datePattern.exec(text);
  const m = dateOnly ?? dateTimePattern.exec(text);
  if (!m) return { ok: false, reason: 'is not a date in the form YYYY-MM-DD or YYYY-MM-DDTHH:mm:ssZ' };
  const day = calendarDay(Number(m[1]), Number(m[2]), Number(m[3]));
  if (day === null) return { ok: false, reason: `${text.slice(0, 10)} is not a day in the calendar` };
  if (dateOnly) return { ok: true, date: new Date(day) };
  const [hours, minutes, seconds] = [Number(m[4]), Number(m[5]), Number(m[6] ?? 0)];
  if (hours > 23 || minutes > 59 || seconds > 59) {
    return { ok: false, reason: `${text.slice(11, 19)} is not a time of day (00:00:00 to 23:59:59)` };
  }
  const millis = Number((m[7] ?? '0').padEnd(3, '0').slice(0, 3));
  let offsetMinutes = 0;
  const zone = m[8];
  if (zone && zone.toUpperCase() !== 'Z') {
    const digits = zone.slice(1).replace(':', '');
    const [oh, om] = [Number(digits.slice(0, 2)), Number(digits.slice(2))];
    if (oh > 14 || om > 59) return { ok: false, reason: `${zone} is not a time-zone offset` };
    offsetMinutes = (zone.startsWith('-') ? -1 : 1) * (oh * 60 + om);
  }
  const ms = day + ((hours * 60 + minutes - offsetMinutes) * 60 + seconds) * 1000 + millis;
  return { ok: true, date: new Date(ms) };
}

/** The instant a text names under Ballast's one clock, or null when it names none. */
export function parseInstant(value: string): Date | null {
  const result = readInstant(value);
  return result.ok ? result.date : null;
}

/** `YYYY-MM-DD` only: 00:00 UTC that day, or null (also for 2026-02-30). */
export function parseCalendarDate(value: string): Date | null {
  return datePattern.test(value.trim()) ? parseInstant(value) : null;
}

/** A Date, or a text read by `parseInstant`, as epoch milliseconds; NaN when the text names no instant. */
export function instantMs(value: string | Date): number {
  if (value instanceof Date) return value.getTime();
  return parseInstant(value)?.getTime() ?? Number.NaN;
}

/** Minutes after local midnight (0..1439) at an instant in an IANA time zone, daylight saving included. */
export function localMinuteOfDay(instant: Date, timeZone: string): number {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hour: '2-digit',
    minute: '2-digit',
    hourCycle: 'h23',
  }).formatToParts(instant);
  const hour = Number(parts.find((p) => p.type === 'hour')?.value ?? 0);
  const minute = Number(parts.find((p) => p.type === 'minute')?.value ?? 0);
  return hour * 60 + minute;
}

/** Whether an IANA time-zone name is one this runtime knows ('Europe/Berlin' yes, 'Mars/Olympus' no). */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}
