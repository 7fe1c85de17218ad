import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useMyDigests } from '../../../features/subscriptions/api/get-my-digests';
import { useSetMyDigest } from '../../../features/subscriptions/api/set-my-digest';

export function Component() {
  const digests = useMyDigests();
  const setDigest = useSetMyDigest();
  return (
    <>
      <PageHeader
        title="My digests"
        lead="Which weekly digests reach your inbox. Managers receive their categories' digests and executives the portfolio digest unless they turn them off."
      />
      {digests.isPending ? <Loading /> : null}
      {digests.isError ? <ErrorPanel error={digests.error} onRetry={() => void digests.refetch()} /> : null}
      {digests.data && digests.data.length === 0 ? (
        <EmptyState title="No digest to subscribe to">
          Digests go by mail to the managers of each category and to executives. Operations can add other
          addresses to a schedule.
        </EmptyState>
      ) : null}
      {setDigest.isError ? <ErrorPanel error={setDigest.error} /> : null}
      <ul className="divide-y divide-ink-100 rounded-lg border border-ink-100 bg-white">
        {(digests.data ?? []).map((d) => (
          <li key={d.target} className="flex items-center justify-between gap-4 px-4 py-3">
            <div>
              <p id={`digest-${d.target}`} className="font-semibold text-ink-900">
                {d.label}
              </p>
              <p className="text-xs text-ink-500">
                {d.subscribed ? 'Arrives every week after the snapshot.' : 'Not sent to you.'}
                {d.byDefault ? ' (default)' : ''}
              </p>
            </div>
            <label className="flex items-center gap-2 text-sm font-semibold">
              <input
                type="checkbox"
                className="h-4 w-4 accent-ink-900"
                aria-describedby={`digest-${d.target}`}
                checked={d.subscribed}
                disabled={setDigest.isPending}
                onChange={(e) => setDigest.mutate({ target: d.target, subscribed: e.target.checked })}
              />
              Mail me this digest
            </label>
          </li>
        ))}
      </ul>
    </>
  );
}
