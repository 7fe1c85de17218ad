import type { WeekSummary } from '../../../../shared/schemas/standings.schema';
import { fmt } from '../../../lib/format';

/** Chooses a snapshot week; the empty value means the latest. */
export function WeekPicker({
  weeks,
  value,
  onChange,
  id = 'week-picker',
}: {
  weeks: WeekSummary[];
  value: string | undefined;
  onChange: (week: string | undefined) => void;
  id?: string;
}) {
  const latest = weeks[0];
  return (
    // Bounded by its row and the select allowed to shrink, so a long week label never runs off a phone.
    <div className="flex min-w-0 max-w-full items-center gap-2">
      <label htmlFor={id} className="shrink-0 text-sm font-semibold text-ink-700">
        Week
      </label>
      <select
        id={id}
        className="min-w-0 max-w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 font-mono text-sm"
        value={value && value !== latest?.isoWeek ? value : ''}
        onChange={(e) => onChange(e.target.value || undefined)}
      >
        {weeks.map((w, i) => (
          <option key={w.isoWeek} value={i === 0 ? '' : w.isoWeek}>
            {w.isoWeek} · to {fmt.date(new Date(new Date(w.cutoff).getTime() - 1).toISOString())}
            {i === 0 ? ' (latest)' : ''}
          </option>
        ))}
      </select>
    </div>
  );
}
