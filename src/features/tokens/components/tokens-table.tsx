import { format } from 'date-fns';
import { roleLabels } from '../../../../shared/auth';
import type { ApiTokenRecord } from '../../../../shared/schemas/tokens.schema';
import { Button } from '../../../components/ui/button';
import { EmptyState, errorMessage } from '../../../components/ui/status';
import { useRevokeToken } from '../api/revoke-token';
import { HandOverToken, type TokenKeeper } from './hand-over-token';

const when = (iso: string | null) => (iso ? format(new Date(iso), 'd MMM yyyy HH:mm') : 'never');

export function TokensTable({
  tokens,
  keepers,
  disabledCreators,
}: {
  tokens: ApiTokenRecord[];
  /** Active administrators a token may be handed to; without them the table offers no hand-over. */
  keepers?: TokenKeeper[];
  /** Ids of disabled people: their tokens are stopped until handed over or until they are enabled. */
  disabledCreators?: ReadonlySet<number>;
}) {
  const revoke = useRevokeToken();
  if (tokens.length === 0)
    return (
      <EmptyState title="No API tokens yet">Create one for each script or system that sends data.</EmptyState>
    );
  return (
    <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
      {revoke.error ? (
        <p role="alert" className="px-4 py-2 text-sm text-coral-500">
          {errorMessage(revoke.error)}
        </p>
      ) : null}
      <table className="w-full text-sm">
        <caption className="sr-only">API tokens</caption>
        <thead className="bg-ink-50 text-left text-ink-700">
          <tr>
            {['Name', 'Starts with', 'Acts as', 'Categories', 'Created', 'Answers to', 'Last used', ''].map(
              (h, i) => (
                <th key={i} scope="col" className="px-4 py-2 whitespace-nowrap">
                  {h || <span className="sr-only">Actions</span>}
                </th>
              ),
            )}
          </tr>
        </thead>
        <tbody>
          {tokens.map((t) => (
            <tr key={t.id} className={`border-t border-ink-100 ${t.revokedAt ? 'text-ink-500' : ''}`}>
              <td className="px-4 py-2 font-semibold">{t.name}</td>
              <td className="px-4 py-2 font-mono">{t.prefix}…</td>
              <td className="px-4 py-2">{roleLabels[t.role]}</td>
              <td className="px-4 py-2">
                {t.categories ? t.categories.map((c) => c.name).join(', ') : 'All'}
              </td>
              <td className="px-4 py-2 whitespace-nowrap">{when(t.createdAt)}</td>
              <td className="px-4 py-2">
                <div className="whitespace-nowrap">{t.createdBy ?? 'Made from the command line'}</div>
                {!t.revokedAt && t.createdById !== null && disabledCreators?.has(t.createdById) ? (
                  <div className="mt-1 inline-block rounded bg-brass-100 px-2 py-0.5 text-xs font-semibold text-brass-700">
                    Stopped: {t.createdBy ?? 'its creator'} is disabled
                  </div>
                ) : null}
                {!t.revokedAt && keepers ? (
                  <div className="mt-1">
                    <HandOverToken token={t} keepers={keepers} />
                  </div>
                ) : null}
              </td>
              <td className="px-4 py-2 whitespace-nowrap">{when(t.lastUsedAt)}</td>
              <td className="px-4 py-2 text-right">
                {t.revokedAt ? (
                  <span className="text-xs">Revoked {when(t.revokedAt)}</span>
                ) : (
                  <Button
                    variant="danger"
                    disabled={revoke.isPending}
                    aria-label={`Revoke ${t.name}`}
                    onClick={() => {
                      if (window.confirm(`Revoke “${t.name}”? Scripts using it will be refused from now on.`))
                        revoke.mutate(t.id);
                    }}
                  >
                    Revoke
                  </Button>
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
