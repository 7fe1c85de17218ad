import { format } from 'date-fns';
import { useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { deliveryStatuses } from '../../../../shared/schemas/digests.schema';
import { Button } from '../../../components/ui/button';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import {
  deliveriesQueryOptions,
  useDeliveries,
  type DeliveryFilter,
} from '../../../features/outbox/api/get-deliveries';
import { useResendDelivery } from '../../../features/outbox/api/resend-delivery';
import { queryClient } from '../../../lib/query-client';

function filterFrom(params: URLSearchParams): DeliveryFilter {
  const status = params.get('status') ?? '';
  return { page: Math.max(1, Number(params.get('page')) || 1), ...(status ? { status } : {}) };
}

export async function loader({ request }: LoaderFunctionArgs) {
  await queryClient.ensureQueryData(deliveriesQueryOptions(filterFrom(new URL(request.url).searchParams)));
  return null;
}

const badge: Record<string, string> = {
  queued: 'bg-brass-100 text-brass-700',
  sending: 'bg-ink-50 text-ink-700',
  sent: 'bg-kelp-500/15 text-kelp-500',
  failed: 'bg-coral-100 text-coral-500',
};

export function Component() {
  const [params, setParams] = useSearchParams();
  const filter = filterFrom(params);
  const deliveries = useDeliveries(filter);
  const resend = useResendDelivery();
  return (
    <>
      <PageHeader
        title="Mail deliveries"
        lead="One row per digest and recipient. Failed sends are retried with growing pauses; resend sends one again."
      />
      <div className="mb-4 flex flex-wrap gap-2" role="group" aria-label="Filter by status">
        {['', ...deliveryStatuses].map((s) => (
          <Button
            key={s || 'all'}
            variant={(filter.status ?? '') === s ? 'primary' : 'secondary'}
            onClick={() => setParams(s ? { status: s } : {})}
          >
            {s || 'All'}
            {s && deliveries.data ? ` (${deliveries.data.counts[s] ?? 0})` : ''}
          </Button>
        ))}
      </div>
      {deliveries.isPending ? <Loading /> : null}
      {deliveries.isError ? <ErrorPanel error={deliveries.error} /> : null}
      {resend.isError ? <ErrorPanel error={resend.error} /> : null}
      {deliveries.data?.items.length === 0 ? <EmptyState title="No deliveries with this status" /> : null}
      {deliveries.data?.items.length ? (
        <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
          <table className="w-full text-left text-sm">
            <thead className="bg-ink-900 text-xs uppercase text-paper">
              <tr>
                <th className="px-3 py-2">Digest</th>
                <th className="px-3 py-2">Recipient</th>
                <th className="px-3 py-2">Status</th>
                <th className="px-3 py-2">Attempts</th>
                <th className="px-3 py-2">Last error / next try</th>
                <th className="px-3 py-2" />
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {deliveries.data.items.map((d) => (
                <tr key={d.id}>
                  <td className="px-3 py-2">
                    <span className="font-semibold">{d.digestLabel}</span>{' '}
                    <span className="font-mono text-xs text-ink-500">{d.isoWeek}</span>
                  </td>
                  <td className="break-all px-3 py-2">{d.recipient}</td>
                  <td className="px-3 py-2">
                    <span className={`rounded px-2 py-0.5 text-xs font-bold ${badge[d.status] ?? ''}`}>
                      {d.status}
                    </span>
                    {d.sentAt ? (
                      <span className="ml-2 text-xs text-ink-500">
                        {format(new Date(d.sentAt), 'd MMM HH:mm')}
                      </span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2 font-mono">{d.attempts}</td>
                  <td className="max-w-xs px-3 py-2 text-xs text-ink-700">
                    {d.lastError ?? ''}
                    {d.nextAttemptAt ? (
                      <span className="block text-ink-500">
                        next try {format(new Date(d.nextAttemptAt), 'HH:mm:ss')}
                      </span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2 text-right">
                    {d.status === 'failed' || d.status === 'sent' ? (
                      <Button
                        variant="secondary"
                        disabled={resend.isPending}
                        onClick={() => resend.mutate(d.id)}
                      >
                        Resend
                      </Button>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </>
  );
}
