import { useEffect, useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import {
  priorWeightStrategies,
  scoreCategory,
  ScoringInputError,
  type ItemSummary,
  type PriorWeightStrategy,
  type ScoreResult,
  type ScoringSettings,
} from '../../../../shared/scoring';
import { countOf } from '../../../../shared/plural';
import type { ScoringSettingsInput } from '../../../../shared/schemas/standings.schema';
import { DriftScatter } from '../../../components/charts/drift-scatter';
import { Button } from '../../../components/ui/button';
import { FlagBadge } from '../../../components/ui/flag-badge';
import { ErrorPanel, Loading, errorMessage } from '../../../components/ui/status';
import { fmt } from '../../../lib/format';
import { useCategorySettings } from '../api/get-category-settings';
import { useUpdateCategorySettings } from '../api/update-category-settings';
import { useWhatIfEvidence } from '../api/get-what-if-evidence';
import type { WhatIfEvidence } from '../../../../shared/schemas/standings.schema';
import { priorWeightApplied, standingsColumns, terms } from '../../../../shared/vocabulary';
import { movedSummary } from './moved-summary';

const weightLabels: Record<PriorWeightStrategy, string> = {
  mean: 'Mean review count per item',
  median: 'Median review count',
  max: 'Largest review count',
  min: 'Smallest review count',
  total: 'Total reviews in the category',
  fixed: 'A fixed number',
  credibility: 'Credibility (Bühlmann)',
};

type Draft = {
  priorWeightStrategy: PriorWeightStrategy;
  priorWeightValue: string;
  priorMeanStrategy: 'weighted' | 'fixed';
  priorMeanValue: string;
  z: string;
  halfLifeDays: string;
  staleAfterDays: string;
  thinEvidenceThreshold: string;
};

function draftFrom(s: ScoringSettings): Draft {
  return {
    priorWeightStrategy: s.priorWeightStrategy,
    priorWeightValue: s.priorWeightValue?.toString() ?? '',
    priorMeanStrategy: s.priorMeanStrategy,
    priorMeanValue: s.priorMeanValue?.toString() ?? '',
    z: String(s.z),
    halfLifeDays: String(s.halfLifeDays),
    staleAfterDays: String(s.staleAfterDays),
    thinEvidenceThreshold: s.thinEvidenceThreshold?.toString() ?? '',
  };
}

const numberOrNull = (text: string) => (text.trim() === '' ? null : Number(text));

function changeFrom(d: Draft): ScoringSettingsInput {
  return {
    priorWeightStrategy: d.priorWeightStrategy,
    priorWeightValue: d.priorWeightStrategy === 'fixed' ? numberOrNull(d.priorWeightValue) : null,
    priorMeanStrategy: d.priorMeanStrategy,
    priorMeanValue: d.priorMeanStrategy === 'fixed' ? numberOrNull(d.priorMeanValue) : null,
    z: Number(d.z),
    halfLifeDays: Number(d.halfLifeDays),
    staleAfterDays: Number(d.staleAfterDays),
    thinEvidenceThreshold: numberOrNull(d.thinEvidenceThreshold),
  };
}

type Scored = { ok: true; result: ScoreResult } | { ok: false; message: string };

function score(
  items: ItemSummary[],
  settings: Partial<ScoringSettings>,
  asOf: string,
  previous: unknown,
): Scored {
  try {
    return {
      ok: true,
      result: scoreCategory(items, settings, {
        asOf,
        previous: previous as Parameters<typeof scoreCategory>[2]['previous'],
      }),
    };
  } catch (err) {
    if (err instanceof ScoringInputError) return { ok: false, message: err.message };
    if (err instanceof Error) return { ok: false, message: err.message };
    throw err;
  }
}

function Field({ label, hint, children }: { label: string; hint?: string; children: React.ReactNode }) {
  return (
    <label className="block text-sm">
      <span className="font-semibold text-ink-800">{label}</span>
      {children}
      {hint ? <span className="mt-0.5 block text-xs text-ink-500">{hint}</span> : null}
    </label>
  );
}

const inputClass = 'mt-1 w-full rounded-md border border-ink-200 bg-white px-2 py-1.5 font-mono text-sm';
const PAGE = 25;
const count = (n: number) => n.toLocaleString('en-GB');

/**
 * The saved side shows the snapshot as taken; when the evidence before the cut-off has changed since, the
 * preview (today's evidence) and the saved side no longer share their input, and the reader must know.
 */
function EvidenceChangedBanner(props: {
  isoWeek: string;
  takenAt: string;
  change: WhatIfEvidence['evidenceChange'];
  savedItems: number;
  savedReviews: number;
  canRecompute: boolean;
  recompute: WhatIfPanelProps['recompute'];
}) {
  const { change } = props;
  const details: string[] = [];
  if (change.lateReviews > 0)
    details.push(
      `${countOf(change.lateReviews, 'review')} dated before the cut-off arrived after it was taken`,
    );
  if (change.reviewCountNow !== props.savedReviews)
    details.push(
      `the week now has ${countOf(change.reviewCountNow, 'review')} instead of ${props.savedReviews.toLocaleString('en-GB')}`,
    );
  if (change.itemCountNow !== props.savedItems)
    details.push(
      `${countOf(change.itemCountNow, 'item')} instead of ${props.savedItems.toLocaleString('en-GB')}`,
    );
  return (
    <div
      role="status"
      data-testid="what-if-evidence-changed"
      className="rounded-lg border border-brass-300 bg-brass-100 p-4 text-sm text-ink-800"
    >
      <p className="font-semibold text-ink-900">
        The evidence for {props.isoWeek} has changed since its snapshot was taken.
      </p>
      <p className="mt-1">
        The saved side shows the standings of {props.isoWeek} as taken on {fmt.dateTime(props.takenAt)}; the
        preview uses today&apos;s evidence: {details.join('; ')}.
      </p>
      {props.canRecompute && props.recompute ? (
        props.recompute(props.isoWeek)
      ) : (
        <p className="mt-1 text-ink-600">Operations staff or an administrator can recompute the snapshot.</p>
      )}
    </div>
  );
}

type WhatIfPanelProps = {
  slug: string;
  week: string | undefined;
  /** The recompute control for a week, composed by the page (the jobs feature owns it). */
  recompute?: (isoWeek: string) => React.ReactNode;
};

/**
 * Re-scores the week's evidence in the browser with the same engine the weekly job runs, so a change of
 * prior or threshold shows its effect at once; saving stores the settings for the next snapshots.
 */
export function WhatIfPanel({ slug, week, recompute }: WhatIfPanelProps) {
  const settings = useCategorySettings(slug);
  const effective = settings.data?.effective as ScoringSettings | undefined;
  const [draft, setDraft] = useState<Draft | null>(null);
  const current = draft ?? (effective ? draftFrom(effective) : null);
  const [fetchHalfLife, setFetchHalfLife] = useState<number | undefined>(undefined);
  const [page, setPage] = useState(1);
  const [saved, setSaved] = useState<string | null>(null);
  const save = useUpdateCategorySettings(slug);

  const wantedHalfLife = current ? Number(current.halfLifeDays) : undefined;
  useEffect(() => {
    if (!wantedHalfLife || !(wantedHalfLife > 0) || wantedHalfLife === effective?.halfLifeDays) {
      const reset = setTimeout(() => setFetchHalfLife(undefined), 0);
      return () => clearTimeout(reset);
    }
    const timer = setTimeout(() => setFetchHalfLife(wantedHalfLife), 400);
    return () => clearTimeout(timer);
  }, [wantedHalfLife, effective?.halfLifeDays]);

  const evidence = useWhatIfEvidence(slug, week, fetchHalfLife);
  const items = evidence.data?.items as unknown as ItemSummary[] | undefined;

  const baseline = useMemo<Scored | null>(() => {
    if (!evidence.data || !items || !effective) return null;
    return score(items, effective, evidence.data.asOf, evidence.data.previous);
  }, [evidence.data, items, effective]);

  const change = current ? changeFrom(current) : null;
  const changeKey = JSON.stringify(change);
  const preview = useMemo<Scored | null>(() => {
    if (!evidence.data || !items || !effective || !change) return null;
    return score(items, { ...effective, ...change }, evidence.data.asOf, evidence.data.previous);
    // changeKey stands for change: the object is rebuilt on every render.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [evidence.data, items, effective, changeKey]);

  if (settings.isPending || (evidence.isPending && !evidence.data))
    return <Loading label="Loading the week's evidence…" />;
  if (settings.isError) return <ErrorPanel error={settings.error} onRetry={() => void settings.refetch()} />;
  if (evidence.isError) return <ErrorPanel error={evidence.error} onRetry={() => void evidence.refetch()} />;
  if (!current || !baseline || !preview || !effective) return null;
  if (!baseline.ok) return <ErrorPanel error={new Error(baseline.message)} />;

  const set = (patch: Partial<Draft>) => {
    setDraft({ ...current, ...patch });
    setPage(1);
    setSaved(null);
  };
  // The saved side is the week's stored standings, so it equals what the standings page shows for the week.
  const savedSide = evidence.data!.saved;
  const before = new Map(savedSide.rows.map((r) => [r.sku, r]));
  const rows = preview.ok
    ? [...preview.result.items]
        .sort((a, b) => a.smoothedPosition - b.smoothedPosition)
        .map((r) => {
          const was = before.get(r.sku)?.smoothedRank ?? null;
          return { r, was, move: was === null ? 0 : was - r.smoothedRank };
        })
    : [];
  const movers = [...rows]
    .filter((x) => x.move !== 0)
    .sort((a, b) => Math.abs(b.move) - Math.abs(a.move) || a.r.smoothedRank - b.r.smoothedRank)
    .slice(0, 10);
  const highlighted = new Set(movers.map((m) => m.r.sku));
  const moved = rows.filter((x) => x.move !== 0).length;
  const pages = Math.max(1, Math.ceil(rows.length / PAGE));
  const shown = rows.slice((page - 1) * PAGE, page * PAGE);
  const p = preview.ok ? preview.result : null;
  const changed = JSON.stringify(changeFrom(draftFrom(effective))) !== changeKey;
  const savedWeek = savedSide.week;
  const savedParams = evidence.data!.resolved as {
    m: number;
    C: number;
    priorWeightStrategy: PriorWeightStrategy;
    priorWeightApplied: PriorWeightStrategy;
  };
  const drift = evidence.data!.evidenceChange;

  const figures: [string, string, string][] = p
    ? [
        ['Prior weight m', fmt.num(savedParams.m, 1), fmt.num(p.resolved.m, 1)],
        ['Prior mean C', fmt.num(savedParams.C, 3), fmt.num(p.resolved.C, 3)],
        [terms.kendall, fmt.num(savedWeek.kendallTauB, 3), fmt.num(p.category.kendallTauB, 3)],
        ['Mean |drift|', fmt.num(savedWeek.meanAbsDrift, 1), fmt.num(p.category.meanAbsDrift, 1)],
        ['Items', count(savedWeek.itemCount), count(p.category.itemCount)],
        ['Reviews', count(savedWeek.reviewCount), count(p.category.reviewCount)],
        [
          'Stale items',
          String(Math.round(savedWeek.staleShare * savedWeek.itemCount)),
          String(p.category.staleCount),
        ],
        [
          'Thin items',
          String(Math.round(savedWeek.thinShare * savedWeek.itemCount)),
          String(p.category.thinCount),
        ],
      ]
    : [];

  return (
    <div className="grid gap-6 xl:grid-cols-[20rem_minmax(0,1fr)]">
      <form
        aria-labelledby="what-if-settings-heading"
        className="space-y-4 self-start rounded-lg border border-ink-100 bg-white p-4"
        onSubmit={(e) => {
          e.preventDefault();
          if (!change || !preview.ok) return;
          save.mutate(change, {
            onSuccess: () => {
              setDraft(null);
              setSaved('Saved. The next weekly snapshot of this category uses these settings.');
            },
          });
        }}
      >
        <h3 id="what-if-settings-heading" className="font-bold text-ink-900">
          Scoring settings
        </h3>
        <Field
          label="Prior weight (m)"
          hint="How many pseudo-reviews at the prior mean each item starts with."
        >
          <select
            className={inputClass}
            value={current.priorWeightStrategy}
            onChange={(e) => set({ priorWeightStrategy: e.target.value as PriorWeightStrategy })}
          >
            {priorWeightStrategies.map((s) => (
              <option key={s} value={s}>
                {weightLabels[s]}
              </option>
            ))}
          </select>
        </Field>
        {current.priorWeightStrategy === 'fixed' ? (
          <Field label="Fixed prior weight">
            <input
              className={inputClass}
              type="number"
              min={0}
              step="any"
              value={current.priorWeightValue}
              onChange={(e) => set({ priorWeightValue: e.target.value })}
            />
          </Field>
        ) : null}
        <Field label="Prior mean (C)" hint="The rating thin evidence is pulled towards.">
          <select
            className={inputClass}
            value={current.priorMeanStrategy}
            onChange={(e) => set({ priorMeanStrategy: e.target.value as 'weighted' | 'fixed' })}
          >
            <option value="weighted">Category&apos;s review-weighted mean</option>
            <option value="fixed">A fixed value</option>
          </select>
        </Field>
        {current.priorMeanStrategy === 'fixed' ? (
          <Field label="Fixed prior mean (1–5)">
            <input
              className={inputClass}
              type="number"
              min={1}
              max={5}
              step="any"
              value={current.priorMeanValue}
              onChange={(e) => set({ priorMeanValue: e.target.value })}
            />
          </Field>
        ) : null}
        <div className="grid grid-cols-2 gap-3">
          <Field label="z (lower bound)">
            <input
              className={inputClass}
              type="number"
              min={0}
              step="any"
              value={current.z}
              onChange={(e) => set({ z: e.target.value })}
            />
          </Field>
          <Field label="Half-life (days)">
            <input
              className={inputClass}
              type="number"
              min={1}
              value={current.halfLifeDays}
              onChange={(e) => set({ halfLifeDays: e.target.value })}
            />
          </Field>
          <Field label="Stale after (days)">
            <input
              className={inputClass}
              type="number"
              min={1}
              value={current.staleAfterDays}
              onChange={(e) => set({ staleAfterDays: e.target.value })}
            />
          </Field>
          <Field label="Thin below (reviews)">
            <input
              className={inputClass}
              type="number"
              min={0}
              step="any"
              placeholder="¼ of mean"
              value={current.thinEvidenceThreshold}
              onChange={(e) => set({ thinEvidenceThreshold: e.target.value })}
            />
          </Field>
        </div>
        {!preview.ok ? (
          <p role="alert" className="rounded-md bg-coral-100 px-3 py-2 text-sm text-ink-900">
            {preview.message}
          </p>
        ) : null}
        <div className="flex flex-wrap items-center gap-2 border-t border-ink-50 pt-3">
          {settings.data?.canEdit ? (
            <Button type="submit" disabled={!changed || !preview.ok || save.isPending}>
              {save.isPending ? 'Saving…' : 'Save settings'}
            </Button>
          ) : (
            <p className="text-sm text-ink-500" data-testid="preview-only">
              <span className="font-semibold text-ink-800">Preview only.</span> The category&apos;s managers
              and administrators can save settings.
            </p>
          )}
          <Button variant="quiet" disabled={!changed} onClick={() => set(draftFrom(effective))}>
            Reset
          </Button>
        </div>
        <div aria-live="polite" className="text-sm">
          {saved ? <p className="font-semibold text-kelp-500">{saved}</p> : null}
          {save.isError ? <p className="text-coral-500">{errorMessage(save.error)}</p> : null}
        </div>
      </form>

      <div className="min-w-0 space-y-6">
        {drift.changed ? (
          <EvidenceChangedBanner
            isoWeek={savedWeek.isoWeek}
            takenAt={savedWeek.takenAt}
            change={drift}
            savedItems={savedWeek.itemCount}
            savedReviews={savedWeek.reviewCount}
            canRecompute={evidence.data!.canRecompute}
            recompute={recompute}
          />
        ) : null}

        {p ? (
          <section
            aria-labelledby="what-if-figures"
            className="rounded-lg border border-ink-100 bg-white p-4"
          >
            <h3 id="what-if-figures" className="font-bold text-ink-900">
              Saved settings → this preview{' '}
              <span className="font-normal text-ink-500">({evidence.data?.isoWeek})</span>
            </h3>
            <dl className="mt-2 grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
              {figures.map(([label, was, now]) => (
                <div key={label} className="rounded-md bg-paper px-3 py-2">
                  <dt className="text-xs font-semibold text-ink-500">{label}</dt>
                  <dd className="font-mono text-sm">
                    <span className="text-ink-500">{was}</span> →{' '}
                    <span className={was === now ? 'text-ink-800' : 'font-bold text-brass-700'}>{now}</span>
                  </dd>
                </div>
              ))}
            </dl>
            <p className="mt-2 text-sm text-ink-700" data-testid="what-if-m-strategy">
              <span className="font-semibold">{standingsColumns.priorWeightApplied.label} for m:</span>{' '}
              <span className="text-ink-500">{priorWeightApplied(savedParams)}</span> →{' '}
              <span
                className={
                  priorWeightApplied(savedParams) === priorWeightApplied(p.resolved)
                    ? 'text-ink-800'
                    : 'font-bold text-brass-700'
                }
              >
                {priorWeightApplied(p.resolved)}
              </span>
            </p>
            <p className="mt-3 text-sm text-ink-700" aria-live="polite" data-testid="what-if-moved">
              {movedSummary(moved, rows.length, movers.length)}
            </p>
          </section>
        ) : null}

        {p ? (
          <section aria-labelledby="what-if-drift" className="rounded-lg border border-ink-100 bg-white p-4">
            <h3 id="what-if-drift" className="font-bold text-ink-900">
              Drift with these settings
            </h3>
            <DriftScatter
              title={`Preview: naive rank against smoothed rank for ${countOf(rows.length, 'item')}`}
              points={p.items.map((r) => ({
                sku: r.sku,
                naive: r.naiveRank,
                smoothed: r.smoothedRank,
                highlight: highlighted.has(r.sku),
              }))}
            />
          </section>
        ) : null}

        {p ? (
          <section aria-labelledby="what-if-standings">
            <h3 id="what-if-standings" className="mb-2 font-bold text-ink-900">
              Standings with these settings
            </h3>
            <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
              <table className="w-full min-w-[44rem] text-sm" data-testid="what-if-table">
                <caption className="sr-only">
                  Items by smoothed rank under the previewed settings, with their rank under the saved ones
                </caption>
                <thead className="bg-ink-50 text-left text-xs uppercase tracking-wide text-ink-700">
                  <tr>
                    <th scope="col" className="px-3 py-2 text-right">
                      Preview #
                    </th>
                    <th scope="col" className="px-3 py-2 text-right">
                      Saved #
                    </th>
                    <th scope="col" className="px-3 py-2 text-right">
                      Change
                    </th>
                    <th scope="col" className="px-3 py-2">
                      Item
                    </th>
                    <th scope="col" className="px-3 py-2 text-right">
                      Reviews
                    </th>
                    <th scope="col" className="px-3 py-2 text-right">
                      Smoothed
                    </th>
                    <th scope="col" className="px-3 py-2 text-right">
                      Drift
                    </th>
                    <th scope="col" className="px-3 py-2">
                      Flags
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {shown.map(({ r, was, move }) => (
                    <tr
                      key={r.sku}
                      className={`border-t border-ink-50 ${highlighted.has(r.sku) ? 'bg-brass-100/70' : ''}`}
                    >
                      <td className="px-3 py-1.5 text-right font-mono font-semibold">{r.smoothedRank}</td>
                      <td className="px-3 py-1.5 text-right font-mono text-ink-500">{was ?? '—'}</td>
                      <td
                        className={`px-3 py-1.5 text-right font-mono font-semibold ${move > 0 ? 'text-kelp-500' : move < 0 ? 'text-coral-500' : 'text-ink-300'}`}
                      >
                        {move === 0 ? '·' : fmt.signed(move)}
                        {highlighted.has(r.sku) ? (
                          <span className="sr-only"> (among the largest moves)</span>
                        ) : null}
                      </td>
                      <td className="min-w-[16rem] px-3 py-1.5">
                        <Link
                          to={`/categories/${slug}/items/${encodeURIComponent(r.sku)}`}
                          className="hover:underline"
                        >
                          <span className="font-semibold">{r.title}</span>{' '}
                          <span className="font-mono text-xs text-ink-500">{r.sku}</span>
                        </Link>
                      </td>
                      <td className="px-3 py-1.5 text-right font-mono">{r.n}</td>
                      <td className="px-3 py-1.5 text-right font-mono">{r.smoothed.toFixed(3)}</td>
                      <td className="px-3 py-1.5 text-right font-mono">{fmt.signed(r.drift)}</td>
                      <td className="px-3 py-1.5">
                        <span className="flex gap-1">
                          {r.stale ? <FlagBadge flag="stale" reason={r.staleReason} /> : null}
                          {r.thin ? <FlagBadge flag="thin" reason={countOf(r.n, 'review')} /> : null}
                          {r.negativeCluster ? <FlagBadge flag="cluster" reason={r.clusterReason} /> : null}
                        </span>
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            <nav
              aria-label="Pages of the preview"
              className="mt-2 flex items-center justify-end gap-2 text-sm"
            >
              <Button variant="secondary" disabled={page <= 1} onClick={() => setPage(page - 1)}>
                Previous
              </Button>
              <span className="font-mono">
                {page} / {pages}
              </span>
              <Button variant="secondary" disabled={page >= pages} onClick={() => setPage(page + 1)}>
                Next
              </Button>
            </nav>
          </section>
        ) : null}
      </div>
    </div>
  );
}
