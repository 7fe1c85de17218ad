import type { ReactNode } from 'react';
import { Link, useParams, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { countOf } from '../../../../shared/plural';
import { homeLabel, priorWeightApplied, standingsColumns as label } from '../../../../shared/vocabulary';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Caution } from '../../../components/ui/caution';
import { FlagBadge } from '../../../components/ui/flag-badge';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useMe } from '../../../features/auth/api/get-me';
import { itemQueryOptions, useItem } from '../../../features/item/api/get-item';
import { EvidenceOverTime, RankTimeline, StarHistogram } from '../../../features/item/components/item-charts';
import { WhatItTakes } from '../../../features/item/components/what-it-takes';
import { fmt } from '../../../lib/format';
import { queryClient } from '../../../lib/query-client';

export async function loader({ params, request }: LoaderFunctionArgs) {
  const week = new URL(request.url).searchParams.get('week') ?? undefined;
  await queryClient.ensureQueryData(itemQueryOptions(params.slug ?? '', params.sku ?? '', week));
  return null;
}

function Panel({
  title,
  id,
  children,
  className = '',
}: {
  title: string;
  id: string;
  children: ReactNode;
  className?: string;
}) {
  return (
    <section
      aria-labelledby={id}
      className={`min-w-0 rounded-lg border border-ink-100 bg-white p-4 ${className}`}
    >
      <h2 id={id} className="mb-2 font-bold text-ink-900">
        {title}
      </h2>
      <WidgetBoundary label={id}>{children}</WidgetBoundary>
    </section>
  );
}

function Stars({ value }: { value: number }) {
  return (
    <span aria-label={`${value} stars`} className="tracking-tight text-brass-500">
      {'★'.repeat(value)}
      <span className="text-ink-100">{'★'.repeat(5 - value)}</span>
    </span>
  );
}

export function Component() {
  const { slug = '', sku = '' } = useParams();
  const [params] = useSearchParams();
  const week = params.get('week') ?? undefined;
  const item = useItem(slug, sku, week);
  const { data: me } = useMe();
  if (item.isPending) return <Loading />;
  if (item.isError) return <ErrorPanel error={item.error} onRetry={() => void item.refetch()} />;
  const d = item.data;
  const c = d.current;
  const weeksPresent = d.timeline.filter((w) => w.smoothedRank !== null).length;

  return (
    <>
      <nav aria-label="Breadcrumb" className="mb-2 text-sm text-ink-500">
        <Link to="/" className="hover:underline">
          {homeLabel(me?.role ?? '')}
        </Link>{' '}
        /{' '}
        <Link to={`/categories/${slug}${week ? `?week=${week}` : ''}`} className="hover:underline">
          {d.category.name}
        </Link>{' '}
        / <span className="font-mono">{d.sku}</span>
      </nav>
      <PageHeader
        title={d.title}
        lead={
          <>
            <span className="font-mono">{d.sku}</span> ·{' '}
            {d.isoWeek ? `week ${d.isoWeek}` : 'not in any snapshot'} · ranked in {weeksPresent} of{' '}
            {countOf(d.timeline.length, 'snapshotted week')} since its first
            {c ? (
              <>
                {' '}
                · m = <span className="font-mono">{c.m.toFixed(1)}</span> ({priorWeightApplied(c)})
              </>
            ) : null}
          </>
        }
      />
      {c ? (
        <dl className="mb-5 grid grid-cols-2 gap-3 sm:grid-cols-4 lg:grid-cols-7">
          {(
            [
              [label.smoothedRank.label, `${c.smoothedRank} of ${c.itemCount}`],
              [label.naiveRank.label, String(c.naiveRank)],
              [label.drift.label, fmt.signed(c.drift)],
              [label.n.label, c.n.toLocaleString('en-GB')],
              [label.rawMean.label, fmt.num(c.rawMean, 2)],
              [label.smoothed.label, fmt.num(c.smoothed, 3)],
              [label.lowerBound.label, fmt.num(c.lowerBound, 3)],
            ] as const
          ).map(([label, value]) => (
            <div key={label} className="rounded-lg border border-ink-100 bg-white px-3 py-2">
              <dt className="text-xs font-semibold text-ink-500">{label}</dt>
              <dd className="font-mono text-lg font-semibold text-ink-900">{value}</dd>
            </div>
          ))}
        </dl>
      ) : null}

      <div className="grid gap-5 lg:grid-cols-2">
        <Panel title="Rank over time" id="rank-timeline" className="lg:col-span-2">
          <RankTimeline timeline={d.timeline} sku={d.sku} />
          <details className="mt-2 text-sm">
            <summary className="cursor-pointer font-semibold text-ink-700">Ranks as a table</summary>
            <div className="mt-2 max-h-64 overflow-auto">
              <table
                className="w-full text-sm [&_td]:px-2 [&_th]:px-2 [&_th]:whitespace-nowrap"
                data-testid="timeline-table"
              >
                <caption className="sr-only">Naive and smoothed rank per week</caption>
                <thead className="text-left text-xs uppercase text-ink-500">
                  <tr>
                    <th scope="col">Week</th>
                    <th scope="col" className="text-right">
                      {label.smoothedRank.label}
                    </th>
                    <th scope="col" className="text-right">
                      {label.naiveRank.label}
                    </th>
                    <th scope="col" className="text-right">
                      {label.n.label}
                    </th>
                    <th scope="col" className="text-right">
                      {label.smoothed.label}
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {d.timeline
                    .filter((w) => w.smoothedRank !== null)
                    .reverse()
                    .map((w) => (
                      <tr key={w.isoWeek} className="border-t border-ink-50 font-mono">
                        <td>{w.isoWeek}</td>
                        <td className="text-right">{w.smoothedRank ?? '—'}</td>
                        <td className="text-right">{w.naiveRank ?? '—'}</td>
                        <td className="text-right">{w.n ?? '—'}</td>
                        <td className="text-right">{fmt.num(w.smoothed, 3)}</td>
                      </tr>
                    ))}
                </tbody>
              </table>
            </div>
          </details>
        </Panel>
        <Panel title="Evidence over time" id="evidence-over-time" className="lg:col-span-2">
          <EvidenceOverTime timeline={d.timeline} />
        </Panel>
        {c ? (
          <>
            <Panel title="Flags and why" id="flags">
              <ul className="space-y-2">
                {c.flags.map((f) => (
                  <li key={f.flag} className="flex items-start gap-2 text-sm">
                    {f.on ? (
                      <FlagBadge flag={f.flag} reason={f.reason} />
                    ) : (
                      <span className="inline-flex rounded px-1.5 py-0.5 text-[11px] font-bold uppercase tracking-wide text-ink-300 ring-1 ring-ink-100">
                        {f.flag === 'cluster' ? '1★ cluster' : f.flag}
                        <span className="sr-only"> (not raised)</span>
                      </span>
                    )}
                    <span className={f.on ? 'text-ink-900' : 'text-ink-500'}>{f.reason}</span>
                  </li>
                ))}
              </ul>
            </Panel>
            <Panel title="What it would take" id="what-it-takes">
              <WhatItTakes current={c} />
            </Panel>
            <Panel title="Star histogram" id="histogram">
              {c.histogram ? (
                <StarHistogram histogram={c.histogram} />
              ) : (
                <p className="text-sm text-ink-500">
                  This item has counts and means only, no star histogram.
                </p>
              )}
            </Panel>
            <Panel title="Recency" id="recency">
              <dl className="grid grid-cols-2 gap-x-4 gap-y-2 text-sm">
                <dt className="text-ink-500">Newest review</dt>
                <dd className="font-mono">
                  {fmt.date(c.newestAt)}{' '}
                  <span className="text-ink-500">({fmt.ageBeforeCutoff(c.newestAgeDays)})</span>
                </dd>
                <dt className="text-ink-500">Median review age</dt>
                <dd className="font-mono">{fmt.age(c.medianAgeDays)}</dd>
                <dt className="text-ink-500">Reviews in the last 90 days</dt>
                <dd className="font-mono">{fmt.pct(c.recentShare)}</dd>
                <dt className="text-ink-500">Decayed mean (half-life {countOf(c.halfLifeDays, 'day')})</dt>
                <dd className="font-mono">
                  {fmt.num(c.decayedMean, 2)}{' '}
                  <span className="text-ink-500">from ≈{fmt.num(c.effectiveCount, 1)} effective reviews</span>
                </dd>
                <dt className="text-ink-500">Helpful-weighted mean</dt>
                <dd className="font-mono">{fmt.num(c.helpfulMean, 2)}</dd>
                <dt className="text-ink-500">One-star share</dt>
                <dd className="font-mono">{fmt.pct(c.oneStarShare)}</dd>
              </dl>
            </Panel>
          </>
        ) : null}
        <Panel title="Most helpful reviews" id="helpful" className="lg:col-span-2">
          {d.helpfulReviews.length === 0 ? (
            <EmptyState title="No review of this item has helpful votes yet" />
          ) : (
            <ul className="grid gap-3 md:grid-cols-3">
              {d.helpfulReviews.map((r, i) => (
                <li key={i} className="rounded-md bg-paper p-3 text-sm">
                  <p className="flex items-center justify-between">
                    <Stars value={r.stars} />
                    <span className="text-xs text-ink-500">{fmt.date(r.reviewedAt)}</span>
                  </p>
                  <blockquote className="mt-2 text-ink-900">
                    {r.body ?? <em className="text-ink-500">No text</em>}
                  </blockquote>
                  <p className="mt-2 text-xs text-ink-500">
                    {r.helpfulYes} found it helpful, {r.helpfulNo} did not
                    {r.verified ? ' · verified purchase' : ''}
                  </p>
                </li>
              ))}
            </ul>
          )}
        </Panel>
      </div>
      <Caution />
    </>
  );
}

export const ErrorBoundary = RouteError;
