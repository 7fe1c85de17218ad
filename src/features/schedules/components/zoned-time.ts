const weekdays = ['Sun', 'Mon', 'Tue', 'Wed', 'Thu', 'Fri', 'Sat'];
const months = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * "Mon 7 Dec 2026, 06:00 (UTC+00:00)" from an ISO string that carries the schedule zone's offset, so the
 * time reads as it is on the clock in that zone, whatever the browser's own zone is.
 */
export function formatZoned(iso: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):\d{2}([+-]\d{2}:\d{2}|Z)$/.exec(iso);
  if (!m) return iso;
  const [, y, mo, d, h, mi, offset] = m;
  const weekday = weekdays[new Date(Date.UTC(Number(y), Number(mo) - 1, Number(d))).getUTCDay()];
  return `${weekday} ${Number(d)} ${months[Number(mo) - 1]} ${y}, ${h}:${mi} (UTC${offset === 'Z' ? '+00:00' : offset})`;
}
