import { format } from 'date-fns';
import { useState } from 'react';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { landingQueryOptions, useLanding } from '../../../features/webhooks/api/get-landing';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await queryClient.ensureQueryData(landingQueryOptions());
  return null;
}

export function Component() {
  const landing = useLanding();
  const [open, setOpen] = useState(0);
  return (
    <>
      <PageHeader
        title="The Landing"
        lead="Ballast's own webhook receiver on this machine, standing in for a chat or incident service. It checks each signature with the secret of the webhook registered for its address, as a real receiver would."
      />
      {landing.isPending ? <Loading /> : null}
      {landing.isError ? <ErrorPanel error={landing.error} /> : null}
      {landing.data?.items.length === 0 ? (
        <EmptyState title="Nothing has landed yet">
          Alerts arrive here once a webhook points at the Landing.
        </EmptyState>
      ) : null}
      {landing.data?.items.length ? (
        <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
          <table className="w-full text-left text-sm">
            <thead className="bg-ink-900 text-xs uppercase text-paper">
              <tr>
                <th className="px-3 py-2">Received</th>
                <th className="px-3 py-2">Alert</th>
                <th className="px-3 py-2">Signature</th>
                <th className="px-3 py-2">Event</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {landing.data.items.map((r) => (
                <tr key={r.id} data-testid="landing-receipt" className="align-top">
                  <td className="whitespace-nowrap px-3 py-2">
                    {format(new Date(r.receivedAt), 'd MMM HH:mm:ss')}
                  </td>
                  <td className="px-3 py-2">
                    <button className="text-left underline" onClick={() => setOpen(open === r.id ? 0 : r.id)}>
                      {r.headline ?? r.path}
                    </button>
                    {open === r.id ? (
                      <pre className="mt-2 max-h-80 overflow-auto whitespace-pre-wrap break-all rounded bg-ink-50 p-2 text-xs">
                        {(() => {
                          try {
                            return JSON.stringify(JSON.parse(r.body), null, 2);
                          } catch {
                            return r.body;
                          }
                        })()}
                      </pre>
                    ) : null}
                  </td>
                  <td className="px-3 py-2">
                    <span
                      className={`rounded px-2 py-0.5 text-xs font-bold ${r.verdict === 'verified' ? 'bg-kelp-500/15 text-kelp-500' : 'bg-coral-100 text-coral-500'}`}
                    >
                      {r.verdictText}
                    </span>
                    {r.repeatOf ? (
                      <span className="block text-xs text-ink-500">repeat of #{r.repeatOf}</span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2 font-mono text-xs text-ink-500">{r.eventId ?? '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </>
  );
}
