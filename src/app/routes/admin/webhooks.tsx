import { format } from 'date-fns';
import { useState } from 'react';
import { Link } from 'react-router-dom';
import { Button } from '../../../components/ui/button';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useCreateWebhook } from '../../../features/webhooks/api/create-webhook';
import { useWebhookDeliveries } from '../../../features/webhooks/api/get-webhook-deliveries';
import { useWebhooks, webhooksQueryOptions } from '../../../features/webhooks/api/get-webhooks';
import { useResendWebhookDelivery } from '../../../features/webhooks/api/resend-webhook-delivery';
import { useSetWebhookEnabled } from '../../../features/webhooks/api/set-webhook-enabled';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await queryClient.ensureQueryData(webhooksQueryOptions());
  return null;
}

function DeliveryLog({ id }: { id: number }) {
  const log = useWebhookDeliveries(id);
  const resend = useResendWebhookDelivery();
  if (log.isPending) return <Loading />;
  if (log.isError) return <ErrorPanel error={log.error} />;
  if (log.data.length === 0) return <EmptyState title="Nothing delivered yet" />;
  return (
    <table className="w-full text-left text-xs">
      <thead>
        <tr className="text-ink-500">
          <th className="px-2 py-1">Alert</th>
          <th className="px-2 py-1">Status</th>
          <th className="px-2 py-1">Attempts</th>
          <th className="px-2 py-1">Last error / next try</th>
          <th className="px-2 py-1" />
        </tr>
      </thead>
      <tbody className="divide-y divide-ink-100">
        {log.data.map((d) => (
          <tr key={d.id} data-testid="webhook-delivery">
            <td className="px-2 py-1">
              {d.headline}
              <span className="block font-mono text-ink-500">{d.eventId}</span>
            </td>
            <td className="px-2 py-1 font-semibold">
              {d.status}
              {d.responseStatus ? ` (${d.responseStatus})` : ''}
              {d.sentAt ? (
                <span className="block font-normal text-ink-500">
                  {format(new Date(d.sentAt), 'd MMM HH:mm:ss')}
                </span>
              ) : null}
            </td>
            <td className="px-2 py-1 font-mono">{d.attempts}</td>
            <td className="max-w-xs px-2 py-1">
              {d.lastError ?? ''}
              {d.nextAttemptAt ? (
                <span className="block text-ink-500">
                  next try {format(new Date(d.nextAttemptAt), 'HH:mm:ss')}
                </span>
              ) : null}
            </td>
            <td className="px-2 py-1 text-right">
              {d.status === 'sent' || d.status === 'failed' ? (
                <Button variant="secondary" disabled={resend.isPending} onClick={() => resend.mutate(d.id)}>
                  Resend
                </Button>
              ) : null}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function Component() {
  const hooks = useWebhooks();
  const create = useCreateWebhook();
  const toggle = useSetWebhookEnabled();
  const [name, setName] = useState('');
  const [url, setUrl] = useState('');
  const [open, setOpen] = useState(0);
  return (
    <>
      <PageHeader
        title="Webhooks"
        lead={
          <>
            Every alert goes as signed JSON to each address here, retried with growing pauses until it is
            taken. To watch deliveries without an outside service, register the{' '}
            <Link className="underline" to="/admin/landing">
              Landing
            </Link>
            .
          </>
        }
      />
      <form
        className="mb-4 flex flex-wrap items-end gap-3 rounded-lg border border-ink-100 bg-white p-4 text-sm"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate(
            { name, url },
            {
              onSuccess: () => {
                setName('');
                setUrl('');
              },
            },
          );
        }}
      >
        <label className="flex flex-col gap-1">
          Name
          <input
            className="rounded border border-ink-300 px-2 py-1"
            value={name}
            onChange={(e) => setName(e.target.value)}
          />
        </label>
        <label className="flex min-w-72 flex-1 flex-col gap-1">
          Address
          <input
            className="rounded border border-ink-300 px-2 py-1"
            value={url}
            onChange={(e) => setUrl(e.target.value)}
          />
        </label>
        <Button type="submit" disabled={create.isPending}>
          Register
        </Button>
        {create.isError ? <ErrorPanel error={create.error} /> : null}
      </form>
      {create.data ? (
        <div
          role="status"
          className="mb-4 rounded-lg border-l-4 border-brass-500 bg-brass-100/60 px-4 py-3 text-sm"
        >
          <p className="font-semibold">Signing secret of {create.data.name}: shown this once</p>
          <code className="mt-1 block break-all font-mono" data-testid="webhook-secret">
            {create.data.secret}
          </code>
          <p className="mt-1">Paste it into the receiver now; Ballast will not show it again.</p>
        </div>
      ) : null}
      {hooks.isPending ? <Loading /> : null}
      {hooks.isError ? <ErrorPanel error={hooks.error} /> : null}
      {hooks.data?.length === 0 ? <EmptyState title="No webhooks registered" /> : null}
      <ul className="space-y-3">
        {hooks.data?.map((w) => (
          <li key={w.id} className="rounded-lg border border-ink-100 bg-white p-4 text-sm">
            <div className="flex flex-wrap items-center gap-3">
              <span className="font-semibold">{w.name}</span>
              <span className="break-all font-mono text-xs text-ink-700">{w.url}</span>
              <span className="text-xs text-ink-500">
                {w.counts.sent} sent · {w.counts.queued + w.counts.sending} waiting · {w.counts.failed} failed
              </span>
              <label className="ml-auto flex items-center gap-2">
                <input
                  type="checkbox"
                  checked={w.enabled}
                  onChange={(e) => toggle.mutate({ id: w.id, enabled: e.target.checked })}
                />
                On
              </label>
              <Button variant="secondary" onClick={() => setOpen(open === w.id ? 0 : w.id)}>
                {open === w.id ? 'Hide log' : 'Delivery log'}
              </Button>
            </div>
            {open === w.id ? (
              <div className="mt-3">
                <DeliveryLog id={w.id} />
              </div>
            ) : null}
          </li>
        ))}
      </ul>
    </>
  );
}
