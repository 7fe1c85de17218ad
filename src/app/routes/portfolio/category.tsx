import { lazy, Suspense } from 'react';
import { Link, useParams, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import type { StandingsSort } from '../../../../shared/schemas/standings.schema';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useMe } from '../../../features/auth/api/get-me';
import { categoryQueryOptions, useCategory } from '../../../features/categories/api/get-category';
import { RecomputeWeek } from '../../../features/jobs/components/recompute-week';
import {
  standingsPath,
  standingsQueryOptions,
  useStandings,
} from '../../../features/standings/api/get-standings';
import { weeksQueryOptions, useWeeks } from '../../../features/standings/api/get-weeks';
import { DriftPanel } from '../../../features/standings/components/drift-panel';
import { FreshnessPanel } from '../../../features/standings/components/freshness-panel';
import { Pagination } from '../../../features/standings/components/pagination';
import { StandingsFilters } from '../../../features/standings/components/standings-filters';
import { StandingsTable } from '../../../features/standings/components/standings-table';
import { viewFromParams } from '../../../features/standings/components/standings-view';
import { WeekPicker } from '../../../features/standings/components/week-picker';
import { countOf } from '../../../../shared/plural';
import { priorWeightApplied, rankWords, terms } from '../../../../shared/vocabulary';
import { ApiError } from '../../../lib/api-client';
import { fmt } from '../../../lib/format';
import { queryClient } from '../../../lib/query-client';

const WhatIfPanel = lazy(() =>
  import('../../../features/what-if/components/what-if-panel').then((m) => ({ default: m.WhatIfPanel })),
);

const tabs = [
  { id: 'standings', label: 'Standings' },
  { id: 'drift', label: 'Drift chart' },
  { id: 'freshness', label: 'Freshness' },
  { id: 'what-if', label: 'What-if' },
] as const;
type Tab = (typeof tabs)[number]['id'];

export async function loader({ params, request }: LoaderFunctionArgs) {
  const slug = params.slug ?? '';
  const search = new URL(request.url).searchParams;
  await Promise.all([
    queryClient.ensureQueryData(categoryQueryOptions(slug)),
    queryClient.ensureQueryData(weeksQueryOptions(slug)),
  ]);
  const tab = search.get('view') ?? 'standings';
  if (tab === 'standings') {
    // A category without snapshots is shown as such, not as an error.
    await queryClient
      .ensureQueryData(standingsQueryOptions(slug, viewFromParams(search)))
      .catch((err: unknown) => {
        if (!(err instanceof ApiError && err.status === 404)) throw err;
      });
  }
  return null;
}

export function Component() {
  const { slug = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const category = useCategory(slug);
  const weeks = useWeeks(slug);
  const { data: me } = useMe();
  const view = viewFromParams(params);
  const tab: Tab = (tabs.find((t) => t.id === params.get('view'))?.id ?? 'standings') as Tab;
  const hasWeeks = (weeks.data?.length ?? 0) > 0;
  const standings = useStandings(slug, view);

  const update = (patch: Record<string, string | number | undefined>, keepPage = false) => {
    const next = new URLSearchParams(params);
    for (const [key, value] of Object.entries(patch)) {
      if (value === undefined || value === '') next.delete(key);
      else next.set(key, String(value));
    }
    if (!keepPage) next.delete('page');
    setParams(next);
  };

  const selectTab = (id: Tab) => update({ view: id === 'standings' ? undefined : id }, true);

  if (category.isPending || weeks.isPending) return <Loading />;
  if (category.isError) return <ErrorPanel error={category.error} onRetry={() => void category.refetch()} />;
  if (weeks.isError) return <ErrorPanel error={weeks.error} onRetry={() => void weeks.refetch()} />;
  const chosenWeek = weeks.data.find((w) => w.isoWeek === view.week) ?? weeks.data[0];
  const canCalibrate = me ? ['analyst', 'manager', 'admin'].includes(me.role) : false;

  return (
    <>
      <PageHeader
        title={category.data.name}
        lead={
          chosenWeek ? (
            <>
              {category.data.description} Week <span className="font-mono">{chosenWeek.isoWeek}</span>,
              snapshot taken {fmt.dateTime(chosenWeek.takenAt)}.
            </>
          ) : (
            category.data.description
          )
        }
        actions={
          hasWeeks ? (
            <>
              <WeekPicker weeks={weeks.data} value={view.week} onChange={(week) => update({ week })} />
              <a
                href={standingsPath(slug, view, '.csv')}
                download
                className="inline-flex items-center rounded-md bg-white px-3.5 py-2 text-sm font-semibold text-ink-900 ring-1 ring-ink-200 hover:bg-ink-50"
              >
                Export CSV
              </a>
              <a
                href={standingsPath(slug, view, '.xlsx')}
                download
                className="inline-flex items-center rounded-md bg-white px-3.5 py-2 text-sm font-semibold text-ink-900 ring-1 ring-ink-200 hover:bg-ink-50"
              >
                Export workbook
              </a>
              {canCalibrate ? (
                <Link
                  to={`/categories/${slug}/calibrate${view.week ? `?week=${view.week}` : ''}`}
                  className="inline-flex items-center rounded-md bg-ink-900 px-3.5 py-2 text-sm font-semibold text-paper hover:bg-ink-700"
                >
                  Calibrate
                </Link>
              ) : null}
              <Link
                to={`/categories/${slug}/alerts`}
                className="inline-flex items-center rounded-md bg-white px-3.5 py-2 text-sm font-semibold text-ink-900 ring-1 ring-ink-200 hover:bg-ink-50"
              >
                Alerts
              </Link>
            </>
          ) : null
        }
      />
      {!hasWeeks ? (
        <EmptyState title="No weekly snapshot yet">
          Standings appear after the first snapshot of this category has been taken.
        </EmptyState>
      ) : (
        <>
          {chosenWeek ? (
            <dl className="mb-5 grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
              {[
                ['Items', String(chosenWeek.itemCount)],
                ['Reviews', chosenWeek.reviewCount.toLocaleString()],
                [terms.kendall, fmt.num(chosenWeek.kendallTauB, 3)],
                ['Mean |drift|', fmt.num(chosenWeek.meanAbsDrift, 1)],
                ['Stale', fmt.pct(chosenWeek.staleShare)],
                ['Thin evidence', fmt.pct(chosenWeek.thinShare)],
              ].map(([label, value]) => (
                <div key={label} className="rounded-lg border border-ink-100 bg-white px-3 py-2">
                  <dt className="text-xs font-semibold text-ink-500">{label}</dt>
                  <dd className="font-mono text-lg font-semibold text-ink-900">{value}</dd>
                </div>
              ))}
            </dl>
          ) : null}
          <div
            role="tablist"
            aria-label="Category views"
            className="mb-4 flex flex-wrap gap-1 border-b border-ink-100"
            onKeyDown={(e) => {
              // WAI-ARIA Authoring Practices, tabs pattern: arrows move and select, Home and End jump.
              const at = tabs.findIndex((t) => t.id === tab);
              const to =
                e.key === 'ArrowRight'
                  ? (at + 1) % tabs.length
                  : e.key === 'ArrowLeft'
                    ? (at - 1 + tabs.length) % tabs.length
                    : e.key === 'Home'
                      ? 0
                      : e.key === 'End'
                        ? tabs.length - 1
                        : -1;
              if (to < 0) return;
              e.preventDefault();
              selectTab(tabs[to]!.id);
              document.getElementById(`tab-${tabs[to]!.id}`)?.focus();
            }}
          >
            {tabs.map((t) => (
              <button
                key={t.id}
                role="tab"
                type="button"
                id={`tab-${t.id}`}
                aria-selected={tab === t.id}
                aria-controls={`panel-${t.id}`}
                tabIndex={tab === t.id ? 0 : -1}
                onClick={() => selectTab(t.id)}
                className={`-mb-px shrink-0 whitespace-nowrap border-b-2 px-4 py-2 text-sm font-semibold ${
                  tab === t.id
                    ? 'border-brass-500 text-ink-900'
                    : 'border-transparent text-ink-500 hover:text-ink-800'
                }`}
              >
                {t.label}
              </button>
            ))}
          </div>
          <div role="tabpanel" id={`panel-${tab}`} aria-labelledby={`tab-${tab}`} tabIndex={0}>
            <WidgetBoundary label={tab}>
              {tab === 'standings' ? (
                <div className="space-y-3">
                  <StandingsFilters
                    key={`${view.q ?? ''}|${view.driftMin ?? ''}|${view.driftMax ?? ''}`}
                    view={view}
                    example={standings.data?.rows[0]}
                    onChange={(patch) => update(patch)}
                  />
                  {standings.isPending ? <Loading label="Loading the standings…" /> : null}
                  {standings.isError ? (
                    <ErrorPanel error={standings.error} onRetry={() => void standings.refetch()} />
                  ) : null}
                  {standings.data && standings.data.total === 0 ? (
                    <EmptyState title="No item matches these filters">
                      Clear a filter to see more items.
                    </EmptyState>
                  ) : null}
                  {standings.data && standings.data.total > 0 ? (
                    <div aria-busy={standings.isFetching}>
                      <p className="mb-2 text-xs text-ink-500">
                        Smoothed with m = <span className="font-mono">{standings.data.m.toFixed(1)}</span>{' '}
                        <span data-testid="m-strategy">({priorWeightApplied(standings.data)})</span>{' '}
                        pseudo-reviews at C = <span className="font-mono">{standings.data.C.toFixed(3)}</span>
                        ; thin below{' '}
                        <span className="font-mono">{standings.data.thinThreshold.toFixed(1)}</span> reviews;
                        stale after {countOf(standings.data.staleAfterDays, 'day')}. {terms.drift}.{' '}
                        {terms.ties}
                        {standings.data.rankIntervals ? (
                          <> {rankWords.meaning(standings.data.rankIntervals.level)}</>
                        ) : null}
                      </p>
                      <StandingsTable
                        slug={slug}
                        week={view.week}
                        rows={standings.data.rows}
                        rankLevel={standings.data.rankIntervals?.level ?? null}
                        sort={view.sort}
                        dir={view.dir}
                        onSort={(sort: StandingsSort, dir) => update({ sort, dir })}
                        caption={`Standings of ${category.data.name}, ${standings.data.week.isoWeek}, sorted by ${view.sort} ${view.dir === 'asc' ? 'ascending' : 'descending'}`}
                      />
                      <Pagination
                        page={view.page}
                        pageSize={view.pageSize}
                        total={standings.data.total}
                        onPage={(page) => update({ page }, true)}
                        onPageSize={(pageSize) => update({ pageSize })}
                      />
                    </div>
                  ) : null}
                </div>
              ) : null}
              {tab === 'drift' ? <DriftPanel slug={slug} week={view.week} /> : null}
              {tab === 'freshness' ? <FreshnessPanel slug={slug} week={view.week} /> : null}
              {tab === 'what-if' ? (
                <Suspense fallback={<Loading label="Loading the scoring engine…" />}>
                  <WhatIfPanel
                    slug={slug}
                    week={view.week}
                    recompute={(isoWeek) => <RecomputeWeek slug={slug} isoWeek={isoWeek} />}
                  />
                </Suspense>
              ) : null}
            </WidgetBoundary>
          </div>
        </>
      )}
      <Caution />
    </>
  );
}

export const ErrorBoundary = RouteError;
