import type { JobStatus } from '../../../../shared/schemas/jobs.schema';

const styles: Record<JobStatus, string> = {
  queued: 'bg-ink-100 text-ink-700',
  running: 'bg-brass-100 text-ink-900',
  succeeded: 'bg-kelp-500/15 text-kelp-500',
  failed: 'bg-coral-100 text-coral-500',
};

const labels: Record<JobStatus, string> = {
  queued: 'Queued',
  running: 'Running',
  succeeded: 'Succeeded',
  failed: 'Failed',
};

export function StatusBadge({ status }: { status: JobStatus }) {
  return (
    <span
      className={`inline-flex items-center gap-1.5 rounded-full px-2 py-0.5 text-xs font-semibold ${styles[status]}`}
    >
      {status === 'running' ? (
        <span className="h-1.5 w-1.5 animate-pulse rounded-full bg-brass-500" aria-hidden />
      ) : null}
      {labels[status]}
    </span>
  );
}
