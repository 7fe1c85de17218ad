import { Link } from 'react-router-dom';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useQueueBackfill } from '../api/queue-backfill';

/** Queues a replacing backfill of one category's week, and says where to watch it finish. */
export function RecomputeWeek({ slug, isoWeek }: { slug: string; isoWeek: string }) {
  const recompute = useQueueBackfill();
  return (
    <div className="mt-2 flex flex-wrap items-center gap-3">
      <Button
        type="button"
        disabled={recompute.isPending || recompute.isSuccess}
        onClick={() =>
          recompute.mutate({ category: slug, fromWeek: isoWeek, toWeek: isoWeek, replace: true })
        }
      >
        Recompute {isoWeek}
      </Button>
      {recompute.isSuccess ? (
        <span aria-live="polite">
          Recompute queued. <Link to="/jobs">The job history</Link> shows when it is done.
        </span>
      ) : null}
      {recompute.isError ? <span className="text-red-700">{errorMessage(recompute.error)}</span> : null}
    </div>
  );
}
