import { format, formatDistanceStrict } from 'date-fns';

export const fmt = {
  num: (v: number | null | undefined, digits = 2) =>
    v === null || v === undefined ? '—' : v.toFixed(digits),
  pct: (v: number | null | undefined, digits = 0) =>
    v === null || v === undefined ? '—' : `${(v * 100).toFixed(digits)}%`,
  signed: (v: number | null | undefined) =>
    v === null || v === undefined ? '—' : v > 0 ? `+${v}` : v < 0 ? `−${Math.abs(v)}` : '0',
  /** A date in the reader's own time zone. */
  date: (iso: string | null | undefined) => (iso ? format(new Date(iso), 'd MMM yyyy') : '—'),
  dateTime: (iso: string | null | undefined) => (iso ? format(new Date(iso), 'd MMM yyyy, HH:mm') : '—'),
  age: (days: number | null | undefined) => {
    if (days === null || days === undefined) return '—';
    if (days < 1) return 'today';
    return formatDistanceStrict(0, days * 86_400_000, { roundingMethod: 'floor' });
  },
  /** "on the day of the cut-off" rather than "today before the cut-off". */
  ageBeforeCutoff: (days: number | null | undefined) => {
    if (days === null || days === undefined) return 'no review yet';
    if (days < 1) return 'on the day of the cut-off';
    return `${fmt.age(days)} before the cut-off`;
  },
};
