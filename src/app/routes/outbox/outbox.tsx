import { format } from 'date-fns';
import { useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { outboxQueryOptions, useOutbox } from '../../../features/outbox/api/get-outbox';
import { useOutboxMessage } from '../../../features/outbox/api/get-outbox-message';
import { queryClient } from '../../../lib/query-client';

export async function loader({ request }: LoaderFunctionArgs) {
  const page = Math.max(1, Number(new URL(request.url).searchParams.get('page')) || 1);
  await queryClient.ensureQueryData(outboxQueryOptions(page));
  return null;
}

function Message({ id }: { id: number }) {
  const message = useOutboxMessage(id);
  if (message.isPending) return <Loading />;
  if (message.isError) return <ErrorPanel error={message.error} />;
  const m = message.data;
  return (
    <article className="rounded-lg border border-ink-100 bg-white">
      <header className="border-b border-ink-100 px-4 py-3 text-sm">
        <h2 className="break-words text-lg font-bold text-ink-900">{m.subject}</h2>
        <dl className="mt-2 grid grid-cols-[max-content_1fr] gap-x-3 gap-y-1 text-ink-700">
          {m.headers.map((h) => (
            <div key={h.name} className="contents">
              <dt className="font-semibold">{h.name}</dt>
              <dd className="break-all font-mono text-xs">{h.value}</dd>
            </div>
          ))}
        </dl>
        {m.attachments.length ? (
          <ul className="mt-3 flex flex-wrap gap-2">
            {m.attachments.map((a) => (
              <li key={a.index}>
                <a
                  className="rounded-md bg-ink-50 px-2 py-1 font-semibold text-ink-800 ring-1 ring-ink-200"
                  href={a.url}
                >
                  {a.fileName} · {(a.sizeBytes / 1024).toFixed(0)} KB
                </a>
              </li>
            ))}
          </ul>
        ) : null}
      </header>
      {m.hasHtml ? (
        // No allow-* flags: the mail's HTML runs no script and cannot reach Ballast; the server adds a CSP too.
        <iframe title="HTML part" sandbox="" src={m.htmlUrl} className="h-[36rem] w-full bg-paper" />
      ) : null}
      <details className="border-t border-ink-100 px-4 py-3">
        <summary className="cursor-pointer text-sm font-semibold">Plain-text part</summary>
        <pre className="mt-2 whitespace-pre-wrap break-words font-mono text-xs text-ink-800">{m.text}</pre>
      </details>
    </article>
  );
}

export function Component() {
  const [params, setParams] = useSearchParams();
  const page = Math.max(1, Number(params.get('page')) || 1);
  const selected = Number(params.get('message')) || 0;
  const outbox = useOutbox(page);
  return (
    <>
      <PageHeader
        title="Outbox"
        lead="Mail received by Ballast's local SMTP server (used when no real SMTP server is configured)."
      />
      {outbox.isPending ? <Loading /> : null}
      {outbox.isError ? <ErrorPanel error={outbox.error} onRetry={() => void outbox.refetch()} /> : null}
      {outbox.data?.items.length === 0 ? (
        <EmptyState title="No mail yet">Digest mail shows up here once sent.</EmptyState>
      ) : null}
      {outbox.data?.items.length ? (
        <div className="grid gap-6 lg:grid-cols-[22rem_1fr]">
          <ul className="divide-y divide-ink-100 rounded-lg border border-ink-100 bg-white text-sm">
            {outbox.data.items.map((m) => (
              <li key={m.id}>
                <button
                  type="button"
                  className={`w-full px-3 py-2 text-left ${selected === m.id ? 'bg-brass-100/60' : 'hover:bg-ink-50'}`}
                  onClick={() => setParams({ page: String(page), message: String(m.id) })}
                >
                  <span className="block truncate font-semibold text-ink-900">{m.subject}</span>
                  <span className="block truncate text-xs text-ink-500">
                    to {m.to.join(', ')} · {format(new Date(m.receivedAt), 'd MMM HH:mm')}
                    {m.copies > 1 ? ` · ${m.copies} copies received (same Message-ID)` : ''}
                  </span>
                </button>
              </li>
            ))}
          </ul>
          {selected ? <Message id={selected} /> : <EmptyState title="Choose a message to read it" />}
        </div>
      ) : null}
    </>
  );
}
