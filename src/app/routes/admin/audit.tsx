import { format } from 'date-fns';
import { useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { RouteError } from '../../../components/errors/route-error';
import { NewerOlderPager } from '../../../components/ui/newer-older-pager';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { auditQueryOptions, useAudit, type AuditFilter } from '../../../features/admin/api/get-audit';
import { queryClient } from '../../../lib/query-client';

function filterFrom(params: URLSearchParams): AuditFilter {
  return {
    page: Math.max(1, Number(params.get('page')) || 1),
    ...(params.get('action') ? { action: params.get('action')! } : {}),
    ...(params.get('actor') ? { actor: params.get('actor')! } : {}),
  };
}

export async function loader({ request }: LoaderFunctionArgs) {
  await queryClient.ensureQueryData(auditQueryOptions(filterFrom(new URL(request.url).searchParams)));
  return null;
}

export function Component() {
  const [params, setParams] = useSearchParams();
  const filter = filterFrom(params);
  const audit = useAudit(filter);
  const pages = audit.data ? Math.max(1, Math.ceil(audit.data.total / 50)) : 1;
  const setParam = (key: string, value: string) => {
    const next = new URLSearchParams(params);
    if (value) next.set(key, value);
    else next.delete(key);
    if (key !== 'page') next.delete('page');
    setParams(next);
  };

  return (
    <>
      <PageHeader
        title="Audit log"
        lead="Sign-ins, changes to people, ownership, settings, schedules and tokens."
      />
      <form className="mb-4 flex flex-wrap gap-3" role="search" onSubmit={(e) => e.preventDefault()}>
        <label className="text-sm font-semibold">
          Action
          <input
            className="ml-2 rounded-md border border-ink-200 bg-white px-2 py-1 font-normal"
            placeholder="auth.sign_in"
            defaultValue={filter.action ?? ''}
            onBlur={(e) => setParam('action', e.target.value.trim())}
          />
        </label>
        <label className="text-sm font-semibold">
          Who
          <input
            className="ml-2 rounded-md border border-ink-200 bg-white px-2 py-1 font-normal"
            placeholder="e-mail contains…"
            defaultValue={filter.actor ?? ''}
            onBlur={(e) => setParam('actor', e.target.value.trim())}
          />
        </label>
      </form>
      {audit.isPending ? <Loading /> : null}
      {audit.isError ? <ErrorPanel error={audit.error} onRetry={() => void audit.refetch()} /> : null}
      {audit.data && audit.data.items.length === 0 ? (
        <EmptyState title="Nothing matches these filters" />
      ) : null}
      {audit.data && audit.data.items.length > 0 ? (
        <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
          <table className="w-full text-sm">
            <caption className="sr-only">Audit events, newest first</caption>
            <thead className="bg-ink-50 text-left text-ink-700">
              <tr>
                <th scope="col" className="px-4 py-2">
                  When
                </th>
                <th scope="col" className="px-4 py-2">
                  Who
                </th>
                <th scope="col" className="px-4 py-2">
                  Action
                </th>
                <th scope="col" className="px-4 py-2">
                  Target
                </th>
                <th scope="col" className="px-4 py-2">
                  Details
                </th>
              </tr>
            </thead>
            <tbody>
              {audit.data.items.map((event) => (
                <tr key={event.id} className="border-t border-ink-100 align-top">
                  <td className="whitespace-nowrap px-4 py-2 font-mono text-xs">
                    {format(new Date(event.at), 'yyyy-MM-dd HH:mm:ss')}
                  </td>
                  <td className="px-4 py-2">{event.actorEmail ?? '—'}</td>
                  <td className="px-4 py-2 font-mono text-xs">{event.action}</td>
                  <td className="px-4 py-2">
                    {event.targetType ? `${event.targetType} ${event.targetId ?? ''}` : '—'}
                  </td>
                  <td className="max-w-md break-words px-4 py-2 font-mono text-xs text-ink-500">
                    {event.details ? JSON.stringify(event.details) : ''}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      <NewerOlderPager page={filter.page} pages={pages} onPage={(page) => setParam('page', String(page))} />
    </>
  );
}

export const ErrorBoundary = RouteError;
