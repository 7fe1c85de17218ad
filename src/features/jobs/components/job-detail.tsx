import { jobTriggerLabels } from '../../../../shared/schemas/jobs.schema';
import { Button } from '../../../components/ui/button';
import { ErrorPanel, Loading, errorMessage } from '../../../components/ui/status';
import { useJob } from '../api/get-job';
import { useRetryJob } from '../api/retry-job';
import { formatDuration, formatWhen } from './format';
import { StatusBadge } from './status-badge';

export function JobDetail({
  id,
  onClose,
  onRetried,
}: {
  id: number;
  onClose: () => void;
  onRetried: (id: number) => void;
}) {
  const job = useJob(id);
  const retry = useRetryJob();
  if (job.isPending) return <Loading label="Loading the run…" />;
  if (job.isError) return <ErrorPanel error={job.error} onRetry={() => void job.refetch()} />;
  const run = job.data;
  const facts: [string, string][] = [
    ['Schedule', run.scheduleName ?? (run.scheduleId ? `#${run.scheduleId}` : 'None (run by hand)')],
    ['Category', run.categoryName ?? '—'],
    ['ISO week', run.isoWeek ?? '—'],
    ['Trigger', `${jobTriggerLabels[run.trigger]}${run.retryOf ? ` of run ${run.retryOf}` : ''}`],
    ['Due', formatWhen(run.dueAt)],
    ['Started', formatWhen(run.startedAt)],
    ['Duration', formatDuration(run.durationMs)],
    ['Rows', run.rows === null ? '—' : String(run.rows)],
    ['Attempt', String(run.attempt)],
    ['Requested by', run.createdBy ?? '—'],
    ['App server', run.owner ?? 'not claimed yet'],
  ];
  return (
    <section
      aria-labelledby="run-heading"
      className="rounded-lg border border-ink-100 bg-white p-5"
      data-testid="job-detail"
    >
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id="run-heading" className="flex items-center gap-3 text-lg font-bold">
          Run {run.id}: {run.kind} <StatusBadge status={run.status} />
        </h2>
        <div className="flex gap-2">
          {run.status === 'failed' ? (
            <Button
              disabled={retry.isPending}
              onClick={() => retry.mutate(run.id, { onSuccess: (next) => onRetried(next.id) })}
            >
              Retry
            </Button>
          ) : null}
          <Button variant="secondary" onClick={onClose}>
            Close
          </Button>
        </div>
      </div>
      {retry.error ? (
        <p role="alert" className="mt-2 text-sm text-coral-500">
          {errorMessage(retry.error)}
        </p>
      ) : null}
      <dl className="mt-4 grid grid-cols-2 gap-x-6 gap-y-2 text-sm sm:grid-cols-4">
        {facts.map(([term, value]) => (
          <div key={term}>
            <dt className="text-xs font-semibold uppercase tracking-wide text-ink-500">{term}</dt>
            <dd className="text-ink-900">{value}</dd>
          </div>
        ))}
      </dl>
      {run.error ? (
        <div role="alert" className="mt-4 rounded-md bg-coral-100 px-3 py-2 text-sm text-ink-900">
          <p className="font-semibold">Error</p>
          <p className="mt-1">{run.error}</p>
        </div>
      ) : null}
      <h3 className="mt-4 text-sm font-semibold text-ink-700">Log</h3>
      {run.log.length === 0 ? (
        <p className="mt-1 text-sm text-ink-500">No lines yet.</p>
      ) : (
        <pre
          aria-label={`Log of run ${run.id}`}
          tabIndex={0}
          className="mt-1 max-h-80 overflow-auto rounded-md bg-ink-900 p-3 font-mono text-xs leading-relaxed text-paper"
        >
          {run.log.join('\n')}
        </pre>
      )}
    </section>
  );
}
