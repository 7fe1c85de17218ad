import { useId, useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import type { CalibrationResult, ItemInput, ItemSummary, ScoringSettings } from '../../../../shared/scoring';
import { keyOf } from '../../../../shared/keys';
import { countOf } from '../../../../shared/plural';
import type { WhatIfEvidence } from '../../../../shared/schemas/standings.schema';
import { terms } from '../../../../shared/vocabulary';
import { Button } from '../../../components/ui/button';
import { EmptyState, ErrorPanel, Loading, errorMessage } from '../../../components/ui/status';
import { fmt } from '../../../lib/format';
import { useCalibrationNotes } from '../api/get-calibration-notes';
import { useSaveCalibrationNote } from '../api/save-calibration-note';
import { useCalibrationRun } from '../worker/use-calibration-run';
import { AgreementCurve } from './agreement-curve';
import { parseObservedLines, summarizeObserved } from './observed-summary';

const strategyNames: Record<string, string> = {
  mean: 'Mean count',
  median: 'Median count',
  max: 'Largest count',
  min: 'Smallest count',
  total: 'Total count',
  fixed: 'Fixed (saved)',
  credibility: 'Credibility',
};

const interval = (start: number, end: number | null) =>
  `${start.toFixed(2)} – ${end === null ? '∞' : end.toFixed(2)}`;

/**
 * DESIGN §4.8 in the browser: the observed ordering against the week's evidence, fitted over every swap
 * point of the prior weight with the shared engine's calibrate, in a Web Worker (progress, cancel).
 */
export function CalibrationWorkbench({
  slug,
  evidence,
  canSave,
}: {
  slug: string;
  evidence: WhatIfEvidence;
  canSave: boolean;
}) {
  const textId = useId();
  const fileId = useId();
  const noteId = useId();
  const [text, setText] = useState('');
  const [fixes, setFixes] = useState<Record<string, string>>({});
  const [dropped, setDropped] = useState<Set<string>>(new Set());
  const [result, setResult] = useState<{ value: CalibrationResult; observed: number } | null>(null);
  const [note, setNote] = useState('');
  const notes = useCalibrationNotes(slug);
  const save = useSaveCalibrationNote(slug);

  const items = evidence.items as unknown as ItemSummary[];
  const known = useMemo(() => new Map(items.map((i) => [keyOf(i.sku), i.sku])), [items]);
  const lines = useMemo(() => parseObservedLines(text), [text]);
  const resolve = (sku: string): string | null => {
    if (dropped.has(sku)) return null;
    const wanted = fixes[sku] ?? sku;
    return known.get(keyOf(wanted)) ?? null;
  };
  const summary = summarizeObserved(lines, known, fixes, dropped);
  const { unknown, unresolved, matched: mapped } = summary;

  const readLines = summary.read;
  const {
    run: calibration,
    start,
    cancel,
  } = useCalibrationRun((value) => setResult({ value, observed: readLines }));
  const running = calibration.state === 'running';
  const runError = calibration.state === 'failed' ? calibration.message : null;
  const run = () => {
    setResult(null);
    start({
      items: items as unknown as ItemInput[],
      observed: mapped,
      settings: evidence.settings as unknown as Partial<ScoringSettings>,
      asOf: evidence.asOf,
      unexplainedCount: 10,
    });
  };

  const r = result?.value;
  return (
    <div className="space-y-6">
      <section aria-labelledby="observed-heading" className="rounded-lg border border-ink-100 bg-white p-4">
        <h2 id="observed-heading" className="font-bold text-ink-900">
          1. The observed ordering
        </h2>
        <p className="text-sm text-ink-500">
          Best first: one sku per line, or a CSV with a <span className="font-mono">sku</span> column.
          Compared with {items.length} items of {evidence.isoWeek}.
        </p>
        <div className="mt-3 grid gap-4 md:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
          <div>
            <label htmlFor={textId} className="text-sm font-semibold text-ink-800">
              Skus, best first
            </label>
            <textarea
              id={textId}
              rows={8}
              value={text}
              onChange={(e) => {
                setText(e.target.value);
                setResult(null);
                cancel();
              }}
              className="mt-1 w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 font-mono text-sm"
              placeholder={'TP-2031\nTP-2004\nTP-2077\n…'}
            />
          </div>
          <div className="space-y-3">
            <div>
              <label htmlFor={fileId} className="text-sm font-semibold text-ink-800">
                Or upload a CSV
              </label>
              <input
                id={fileId}
                type="file"
                accept=".csv,.txt,text/csv,text/plain"
                className="mt-1 block w-full text-sm file:mr-3 file:rounded-md file:border-0 file:bg-ink-900 file:px-3 file:py-1.5 file:font-semibold file:text-paper"
                onChange={(e) => {
                  const file = e.target.files?.[0];
                  if (file)
                    void file.text().then((content) => {
                      setText(content);
                      setResult(null);
                      cancel();
                    });
                }}
              />
            </div>
            <p className="text-sm text-ink-700" aria-live="polite">
              <span className="font-mono font-semibold">{summary.read}</span> lines read:{' '}
              <span className="font-mono font-semibold">{mapped.length}</span> matched to items
              {summary.duplicates.length > 0 ? (
                <>
                  , <span className="font-mono font-semibold">{summary.duplicates.length}</span> repeated
                </>
              ) : null}
              {summary.unresolvedLines > 0 ? (
                <>
                  , <span className="font-mono font-semibold">{summary.unresolvedLines}</span> not found
                </>
              ) : null}
              {summary.droppedLines > 0 ? (
                <>
                  , <span className="font-mono font-semibold">{summary.droppedLines}</span> dropped
                </>
              ) : null}
              .
            </p>
            <div className="flex flex-wrap items-center gap-2">
              <Button onClick={run} disabled={mapped.length < 2 || running}>
                Run calibration
              </Button>
              {running ? (
                <Button variant="quiet" onClick={cancel}>
                  Cancel
                </Button>
              ) : null}
            </div>
            {running ? (
              <div className="space-y-1" data-testid="calibration-progress">
                <div
                  role="progressbar"
                  aria-label="Calibration progress"
                  aria-valuemin={0}
                  aria-valuemax={100}
                  aria-valuenow={Math.round(calibration.share * 100)}
                  className="h-2 w-full overflow-hidden rounded-full bg-ink-100"
                >
                  <div
                    className="h-full bg-kelp-500 transition-[width]"
                    style={{ width: `${Math.round(calibration.share * 100)}%` }}
                  />
                </div>
                <p className="text-xs text-ink-500">
                  Searching the swap points in the background: {Math.round(calibration.share * 100)}% done.
                  The page stays usable; Cancel stops the search.
                </p>
              </div>
            ) : null}
            {runError ? (
              <p role="alert" className="text-sm text-coral-500">
                {runError}
              </p>
            ) : null}
          </div>
        </div>
        {summary.duplicates.length > 0 ? (
          <div
            className="mt-4 rounded-md border border-brass-300 bg-brass-100/50 p-3"
            data-testid="repeated-skus"
          >
            <h3 className="text-sm font-bold text-ink-900">Skus listed more than once</h3>
            <p className="text-xs text-ink-700">
              Only the first position of each counts in the fit; the repeats are left out.
            </p>
            <ul className="mt-2 space-y-1 text-sm">
              {summary.duplicates.slice(0, 50).map((d) => (
                <li key={d.line}>
                  Line {d.line}: <span className="font-mono">{d.sku}</span> was already listed on line{' '}
                  {d.firstLine}.
                </li>
              ))}
            </ul>
            {summary.duplicates.length > 50 ? (
              <p className="mt-1 text-xs text-ink-700">
                and {summary.duplicates.length - 50} more repeated lines.
              </p>
            ) : null}
          </div>
        ) : null}
        {unknown.length > 0 ? (
          <div className="mt-4 rounded-md border border-brass-300 bg-brass-100/50 p-3">
            <h3 className="text-sm font-bold text-ink-900">Skus not found in this category</h3>
            <p className="text-xs text-ink-700">
              Type the right sku, or drop the line. Lines left unresolved are left out of the fit.
            </p>
            <ul className="mt-2 space-y-1.5">
              {unknown.map((sku) => {
                const ok = resolve(sku) !== null;
                return (
                  <li key={sku} className="flex flex-wrap items-center gap-2 text-sm">
                    <span className={`w-36 font-mono ${dropped.has(sku) ? 'text-ink-300 line-through' : ''}`}>
                      {sku}
                    </span>
                    <label className="sr-only" htmlFor={`fix-${sku}`}>
                      Replacement for {sku}
                    </label>
                    <input
                      id={`fix-${sku}`}
                      disabled={dropped.has(sku)}
                      value={fixes[sku] ?? ''}
                      placeholder="correct sku"
                      onChange={(e) => setFixes({ ...fixes, [sku]: e.target.value })}
                      className="w-36 rounded-md border border-ink-200 bg-white px-2 py-1 font-mono"
                    />
                    <Button
                      variant="quiet"
                      onClick={() => {
                        const next = new Set(dropped);
                        if (next.has(sku)) next.delete(sku);
                        else next.add(sku);
                        setDropped(next);
                      }}
                    >
                      {dropped.has(sku) ? 'Keep' : 'Drop'}
                    </Button>
                    <span className={`text-xs ${ok ? 'text-kelp-500' : 'text-ink-500'}`}>
                      {dropped.has(sku) ? 'dropped' : ok ? `matched ${resolve(sku)}` : 'not matched'}
                    </span>
                  </li>
                );
              })}
            </ul>
            {unresolved.length > 0 ? (
              <p className="mt-2 text-xs text-ink-700">{unresolved.length} still unresolved.</p>
            ) : null}
          </div>
        ) : null}
      </section>

      {r ? (
        <section
          aria-labelledby="fit-heading"
          className="rounded-lg border border-ink-100 bg-white p-4"
          data-testid="calibration-result"
        >
          <h2 id="fit-heading" className="font-bold text-ink-900">
            2. The best fit
          </h2>
          <dl className="mt-2 grid grid-cols-2 gap-3 md:grid-cols-4">
            <div className="rounded-md bg-paper px-3 py-2">
              <dt className="text-xs font-semibold text-ink-500">Best prior weight m</dt>
              <dd
                className="font-mono text-lg font-semibold"
                data-testid="best-interval"
                data-start={r.best.start}
                data-end={r.best.end ?? ''}
              >
                {interval(r.best.start, r.best.end)}
              </dd>
            </div>
            <div className="rounded-md bg-paper px-3 py-2">
              <dt className="text-xs font-semibold text-ink-500">{terms.kendall} there</dt>
              <dd className="font-mono text-lg font-semibold">{fmt.num(r.best.tau, 3)}</dd>
            </div>
            <div className="rounded-md bg-paper px-3 py-2">
              <dt className="text-xs font-semibold text-ink-500">Prior mean C</dt>
              <dd className="font-mono text-lg font-semibold">{r.C.toFixed(3)}</dd>
            </div>
            <div className="rounded-md bg-paper px-3 py-2">
              <dt className="text-xs font-semibold text-ink-500">Items compared</dt>
              <dd className="font-mono text-lg font-semibold">
                {r.matchedCount} <span className="text-sm text-ink-500">of {result.observed} lines</span>
              </dd>
            </div>
          </dl>
          <p className="mt-2 text-sm text-ink-700">
            Any m in the interval gives the same ordering; a representative value is{' '}
            <span className="font-mono">{r.best.point.toFixed(2)}</span>.
            {r.best.tiedSteps > 0 ? ` ${r.best.tiedSteps} other intervals agree as well.` : ''}{' '}
            {r.swapPointCount} swap points examined
            {r.curveExact ? '' : '; the curve is condensed for drawing'}.
          </p>
          <div className="mt-4">
            <AgreementCurve result={r} />
          </div>
          <div className="mt-5 grid gap-5 lg:grid-cols-2">
            <div>
              <h3 className="text-sm font-bold text-ink-900">Where the named strategies fall</h3>
              <table className="mt-2 w-full text-sm">
                <caption className="sr-only">
                  Named prior-weight strategies with their m and agreement
                </caption>
                <thead className="text-left text-xs uppercase text-ink-500">
                  <tr>
                    <th scope="col">Strategy</th>
                    <th scope="col" className="text-right">
                      m
                    </th>
                    <th scope="col" className="text-right">
                      {terms.kendallShort}
                    </th>
                    <th scope="col" className="text-right">
                      Short of best
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {r.strategies.map((s) => (
                    <tr key={s.strategy} className="border-t border-ink-50">
                      <td className="py-1">{strategyNames[s.strategy] ?? s.strategy}</td>
                      <td className="py-1 text-right font-mono">{fmt.num(s.m, 1)}</td>
                      <td className="py-1 text-right font-mono">{fmt.num(s.tau, 3)}</td>
                      <td className="py-1 text-right font-mono">
                        {s.tau !== null && r.best.tau !== null ? (r.best.tau - s.tau).toFixed(3) : '—'}
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <div>
              <h3 className="text-sm font-bold text-ink-900">Items the best fit leaves unexplained</h3>
              {r.unexplained.length === 0 ? (
                <p className="mt-2 text-sm text-ink-500">
                  The best fit places every item where it was observed.
                </p>
              ) : (
                <table className="mt-2 w-full text-sm">
                  <caption className="sr-only">Items whose observed position the fit misses most</caption>
                  <thead className="text-left text-xs uppercase text-ink-500">
                    <tr>
                      <th scope="col">Sku</th>
                      <th scope="col" className="text-right">
                        Observed
                      </th>
                      <th scope="col" className="text-right">
                        Fitted
                      </th>
                      <th scope="col" className="text-right">
                        Gap
                      </th>
                    </tr>
                  </thead>
                  <tbody>
                    {r.unexplained.map((u) => (
                      <tr key={u.sku} className="border-t border-ink-50 font-mono">
                        <td className="py-1">
                          <Link
                            className="hover:underline"
                            to={`/categories/${slug}/items/${encodeURIComponent(u.sku)}`}
                          >
                            {u.sku}
                          </Link>
                        </td>
                        <td className="py-1 text-right">{u.observedPosition}</td>
                        <td className="py-1 text-right">{u.fittedPosition}</td>
                        <td className="py-1 text-right">{fmt.signed(u.gap)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              )}
            </div>
          </div>
          {canSave ? (
            <form
              className="mt-5 flex flex-wrap items-end gap-3 border-t border-ink-50 pt-4"
              onSubmit={(e) => {
                e.preventDefault();
                save.mutate(
                  {
                    isoWeek: evidence.isoWeek,
                    note: note.trim(),
                    observedCount: r.matchedCount + r.unmatched.length,
                    matchedCount: r.matchedCount,
                    unmatched: r.unmatched.slice(0, 500),
                    C: r.C,
                    best: { start: r.best.start, end: r.best.end, point: r.best.point, tau: r.best.tau },
                    strategies: r.strategies.map((s) => ({ strategy: s.strategy, m: s.m, tau: s.tau })),
                    unexplained: r.unexplained.slice(0, 50),
                  },
                  { onSuccess: () => setNote('') },
                );
              }}
            >
              <label htmlFor={noteId} className="flex-1 text-sm font-semibold text-ink-800">
                Note (where the ordering came from, what you concluded)
                <input
                  id={noteId}
                  value={note}
                  maxLength={2000}
                  onChange={(e) => setNote(e.target.value)}
                  className="mt-1 w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 font-normal"
                />
              </label>
              <Button type="submit" disabled={save.isPending}>
                {save.isPending ? 'Saving…' : 'Save as a note'}
              </Button>
              <span aria-live="polite" className="text-sm">
                {save.isSuccess ? (
                  <span className="font-semibold text-kelp-500">Saved to the category.</span>
                ) : null}
                {save.isError ? <span className="text-coral-500">{errorMessage(save.error)}</span> : null}
              </span>
            </form>
          ) : null}
        </section>
      ) : null}

      <section aria-labelledby="notes-heading" className="rounded-lg border border-ink-100 bg-white p-4">
        <h2 id="notes-heading" className="font-bold text-ink-900">
          Saved calibration notes
        </h2>
        {notes.isPending ? <Loading /> : null}
        {notes.isError ? <ErrorPanel error={notes.error} onRetry={() => void notes.refetch()} /> : null}
        {notes.data && notes.data.length === 0 ? (
          <EmptyState title="No calibration saved for this category yet" />
        ) : null}
        {notes.data && notes.data.length > 0 ? (
          <ul className="mt-2 divide-y divide-ink-50 text-sm">
            {notes.data.map((n) => (
              <li key={n.id} className="py-2">
                <p>
                  <span className="font-semibold">{n.note || 'Untitled calibration'}</span>{' '}
                  <span className="text-ink-500">
                    · {n.isoWeek} · {n.createdBy}, {fmt.dateTime(n.createdAt)}
                  </span>
                </p>
                <p className="font-mono text-xs text-ink-700">
                  m ∈ {interval(n.best.start, n.best.end)}, {terms.kendallShort} {fmt.num(n.best.tau, 3)},{' '}
                  {countOf(n.matchedCount, 'item')}, {n.unexplained.length.toLocaleString('en-GB')}{' '}
                  unexplained
                </p>
              </li>
            ))}
          </ul>
        ) : null}
      </section>
    </div>
  );
}
