import { useState, type FormEvent } from 'react';
import { flagLabels, type FlagCode } from '../../../components/ui/flag-badge';
import type { StandingsView } from '../api/get-standings';

const flagCodes: FlagCode[] = ['stale', 'thin', 'cluster', 'mover'];

/** Flags apply at once; text and drift range apply on submit (Enter) so typing does not flood the server. */
/** "e.g. TP-20 or pack", from an item of the category on screen rather than from another category. */
function searchExample({ sku, title }: { sku: string; title: string }): string {
  const words = title.split(/\s+/).filter((w) => /^[A-Za-z]{3,}$/.test(w));
  const word = (words[1] ?? words[0] ?? '').toLowerCase();
  const prefix = sku.slice(0, Math.min(sku.length, 5));
  return word ? `e.g. ${prefix} or ${word}` : `e.g. ${prefix}`;
}

export function StandingsFilters({
  view,
  onChange,
  example,
}: {
  view: StandingsView;
  /** An item of the category on screen, for the search placeholder. */
  example?: { sku: string; title: string };
  onChange: (patch: Partial<Record<'flags' | 'q' | 'driftMin' | 'driftMax', string | undefined>>) => void;
}) {
  const active = new Set(view.flags ? view.flags.split(',') : []);
  const [q, setQ] = useState(view.q ?? '');
  const [min, setMin] = useState(view.driftMin?.toString() ?? '');
  const [max, setMax] = useState(view.driftMax?.toString() ?? '');
  const submit = (e: FormEvent) => {
    e.preventDefault();
    onChange({ q: q.trim() || undefined, driftMin: min || undefined, driftMax: max || undefined });
  };
  const toggle = (flag: FlagCode) => {
    const next = new Set(active);
    if (next.has(flag)) next.delete(flag);
    else next.add(flag);
    onChange({ flags: next.size > 0 ? flagCodes.filter((f) => next.has(f)).join(',') : undefined });
  };
  const input = 'rounded-md border border-ink-200 bg-white px-2 py-1.5 text-sm';
  return (
    <form
      role="search"
      aria-label="Filter the standings"
      onSubmit={submit}
      className="flex flex-wrap items-end gap-x-5 gap-y-3 rounded-lg border border-ink-100 bg-white px-4 py-3"
    >
      <fieldset>
        <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ink-500">
          Only items that are
        </legend>
        <div className="flex flex-wrap gap-1.5">
          {flagCodes.map((flag) => (
            <button
              key={flag}
              type="button"
              aria-pressed={active.has(flag)}
              title={flagLabels[flag].explain}
              onClick={() => toggle(flag)}
              className={`rounded-full px-3 py-1 text-xs font-semibold ring-1 transition ${
                active.has(flag)
                  ? 'bg-ink-900 text-paper ring-ink-900'
                  : 'bg-white text-ink-700 ring-ink-200 hover:bg-ink-50'
              }`}
            >
              {flagLabels[flag].short}
            </button>
          ))}
        </div>
      </fieldset>
      <label className="flex flex-col text-xs font-semibold uppercase tracking-wide text-ink-500">
        Sku or title
        <input
          type="search"
          className={`${input} mt-1 w-52 font-normal normal-case tracking-normal`}
          value={q}
          onChange={(e) => setQ(e.target.value)}
          placeholder={example ? searchExample(example) : 'a SKU or a word of a title'}
        />
      </label>
      <fieldset className="flex items-end gap-2">
        <legend className="mb-1 text-xs font-semibold uppercase tracking-wide text-ink-500">
          Drift between
        </legend>
        <label className="sr-only" htmlFor="drift-min">
          Smallest drift
        </label>
        <input
          id="drift-min"
          type="number"
          inputMode="numeric"
          className={`${input} w-20 font-mono`}
          value={min}
          onChange={(e) => setMin(e.target.value)}
          placeholder="min"
        />
        <span className="pb-1.5 text-sm text-ink-500">and</span>
        <label className="sr-only" htmlFor="drift-max">
          Largest drift
        </label>
        <input
          id="drift-max"
          type="number"
          inputMode="numeric"
          className={`${input} w-20 font-mono`}
          value={max}
          onChange={(e) => setMax(e.target.value)}
          placeholder="max"
        />
      </fieldset>
      <button
        type="submit"
        className="rounded-md bg-ink-900 px-3 py-1.5 text-sm font-semibold text-paper hover:bg-ink-700"
      >
        Apply
      </button>
      {view.flags || view.q || view.driftMin !== undefined || view.driftMax !== undefined ? (
        <button
          type="button"
          className="text-sm font-semibold text-ink-700 underline"
          onClick={() => {
            setQ('');
            setMin('');
            setMax('');
            onChange({ flags: undefined, q: undefined, driftMin: undefined, driftMax: undefined });
          }}
        >
          Clear filters
        </button>
      ) : null}
    </form>
  );
}
