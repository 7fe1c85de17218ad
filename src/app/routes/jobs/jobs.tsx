import { useState } from 'react';
import { useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { lastCompletedIsoWeek } from '../../../../shared/iso-week';
import { countOf } from '../../../../shared/plural';
import { jobStatuses, jobTriggerLabels, type JobStatus } from '../../../../shared/schemas/jobs.schema';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { NewerOlderPager } from '../../../components/ui/newer-older-pager';
import { Button } from '../../../components/ui/button';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import {
  JOBS_PAGE_SIZE,
  jobsQueryOptions,
  useJobs,
  type JobFilter,
} from '../../../features/jobs/api/get-jobs';
import { BackfillForm } from '../../../features/jobs/components/backfill-form';
import { formatDuration, formatWhen } from '../../../features/jobs/components/format';
import { JobDetail } from '../../../features/jobs/components/job-detail';
import { StatusBadge } from '../../../features/jobs/components/status-badge';
import { queryClient } from '../../../lib/query-client';

function filterFrom(params: URLSearchParams): JobFilter {
  const status = params.get('status');
  const category = Number(params.get('category'));
  return {
    page: Math.max(1, Number(params.get('page')) || 1),
    ...(status && (jobStatuses as readonly string[]).includes(status) ? { status: status as JobStatus } : {}),
    ...(Number.isInteger(category) && category > 0 ? { category } : {}),
  };
}

export async function loader({ request }: LoaderFunctionArgs) {
  await Promise.all([
    queryClient.ensureQueryData(jobsQueryOptions(filterFrom(new URL(request.url).searchParams))),
    queryClient.ensureQueryData(categoriesQueryOptions()),
  ]);
  return null;
}

const select = 'ml-2 rounded-md border border-ink-200 bg-white px-2 py-1 font-normal';

export function Component() {
  const [params, setParams] = useSearchParams();
  const filter = filterFrom(params);
  const jobs = useJobs(filter);
  const categories = useCategories();
  const selected = Number(params.get('run')) || null;
  const [backfilling, setBackfilling] = useState(false);
  const pages = jobs.data ? Math.max(1, Math.ceil(jobs.data.total / JOBS_PAGE_SIZE)) : 1;
  const setParam = (key: string, value: string) => {
    const next = new URLSearchParams(params);
    if (value) next.set(key, value);
    else next.delete(key);
    if (key !== 'page' && key !== 'run') next.delete('page');
    setParams(next);
  };

  return (
    <>
      <PageHeader
        title="Job history"
        lead="Every snapshot and backfill run: on schedule, caught up after downtime, run by hand, or retried."
        actions={
          <div className="flex items-center gap-3">
            {jobs.data && jobs.data.active > 0 ? (
              <span role="status" className="text-sm text-ink-500">
                {countOf(jobs.data.active, 'run')} in progress — updating
              </span>
            ) : null}
            <Button
              variant="secondary"
              aria-expanded={backfilling}
              onClick={() => setBackfilling((open) => !open)}
            >
              {backfilling ? 'Close backfill' : 'Backfill past weeks'}
            </Button>
          </div>
        }
      />
      {backfilling ? (
        <BackfillForm
          categories={categories.data ?? []}
          lastWeek={lastCompletedIsoWeek(new Date())}
          onQueued={(ids) => {
            const next = new URLSearchParams(params);
            next.delete('page');
            next.delete('status');
            if (ids.length === 1) next.set('run', String(ids[0]));
            setParams(next);
          }}
        />
      ) : null}
      <form
        className="mb-4 flex flex-wrap gap-4"
        role="search"
        aria-label="Filter runs"
        onSubmit={(e) => e.preventDefault()}
      >
        <label className="text-sm font-semibold">
          Status
          <select
            className={select}
            value={filter.status ?? ''}
            onChange={(e) => setParam('status', e.target.value)}
          >
            <option value="">Any</option>
            {jobStatuses.map((s) => (
              <option key={s} value={s}>
                {s[0]!.toUpperCase() + s.slice(1)}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm font-semibold">
          Category
          <select
            className={select}
            value={filter.category ? String(filter.category) : ''}
            onChange={(e) => setParam('category', e.target.value)}
          >
            <option value="">Any</option>
            {(categories.data ?? []).map((c) => (
              <option key={c.id} value={c.id}>
                {c.name}
              </option>
            ))}
          </select>
        </label>
      </form>
      {selected ? (
        <div className="mb-6">
          <WidgetBoundary label="run detail">
            <JobDetail
              id={selected}
              onClose={() => setParam('run', '')}
              onRetried={(id) => setParam('run', String(id))}
            />
          </WidgetBoundary>
        </div>
      ) : null}
      <WidgetBoundary label="job history">
        {jobs.isPending ? <Loading label="Loading job history…" /> : null}
        {jobs.isError ? <ErrorPanel error={jobs.error} onRetry={() => void jobs.refetch()} /> : null}
        {jobs.data && jobs.data.items.length === 0 ? (
          <EmptyState
            title={filter.status || filter.category ? 'No runs match these filters' : 'No runs yet'}
          >
            Runs appear here when a schedule fires or someone runs one now.
          </EmptyState>
        ) : null}
        {jobs.data && jobs.data.items.length > 0 ? (
          <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
            <table className="w-full text-sm">
              <caption className="sr-only">Job runs, newest first</caption>
              <thead className="bg-ink-50 text-left text-ink-700">
                <tr>
                  {[
                    'Run',
                    'Status',
                    'Schedule',
                    'Category',
                    'Week',
                    'Trigger',
                    'Started',
                    'Duration',
                    'Rows',
                  ].map((h) => (
                    <th
                      key={h}
                      scope="col"
                      className={`px-4 py-2 ${h === 'Rows' || h === 'Duration' ? 'text-right' : ''}`}
                    >
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {jobs.data.items.map((run) => (
                  <tr
                    key={run.id}
                    className={`border-t border-ink-100 ${selected === run.id ? 'bg-brass-100/50' : 'hover:bg-ink-50'}`}
                  >
                    <td className="px-4 py-2">
                      <button
                        type="button"
                        className="font-mono font-semibold text-ink-900 underline decoration-ink-200 underline-offset-2"
                        aria-label={`Show run ${run.id}`}
                        onClick={() => setParam('run', String(run.id))}
                      >
                        #{run.id}
                      </button>
                    </td>
                    <td className="px-4 py-2">
                      <StatusBadge status={run.status} />
                    </td>
                    <td className="px-4 py-2">
                      {run.scheduleName ??
                        (run.scheduleId ? `#${run.scheduleId}` : run.kind === 'backfill' ? 'Backfill' : '—')}
                    </td>
                    <td className="px-4 py-2">{run.categoryName ?? '—'}</td>
                    <td className="whitespace-nowrap px-4 py-2 font-mono text-xs">{run.isoWeek ?? '—'}</td>
                    <td className="whitespace-nowrap px-4 py-2 text-ink-700">
                      {jobTriggerLabels[run.trigger]}
                    </td>
                    <td className="whitespace-nowrap px-4 py-2 font-mono text-xs">
                      {formatWhen(run.startedAt)}
                    </td>
                    <td className="px-4 py-2 text-right font-mono text-xs">
                      {formatDuration(run.durationMs)}
                    </td>
                    <td className="px-4 py-2 text-right font-mono text-xs">{run.rows ?? '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : null}
      </WidgetBoundary>
      <NewerOlderPager page={filter.page} pages={pages} onPage={(page) => setParam('page', String(page))} />
    </>
  );
}

export const ErrorBoundary = RouteError;
