import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { PageHeader } from '../../../components/ui/page-header';
import { ErrorPanel, Loading } from '../../../components/ui/status';
import { usersQueryOptions, useUsers } from '../../../features/admin/api/get-users';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import { tokensQueryOptions, useTokens } from '../../../features/tokens/api/get-tokens';
import { CreateTokenForm } from '../../../features/tokens/components/create-token-form';
import { TokensTable } from '../../../features/tokens/components/tokens-table';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await Promise.all([
    queryClient.ensureQueryData(tokensQueryOptions()),
    queryClient.ensureQueryData(categoriesQueryOptions()),
    queryClient.ensureQueryData(usersQueryOptions()),
  ]);
  return null;
}

export function Component() {
  const tokens = useTokens();
  const categories = useCategories();
  const users = useUsers();
  // A token answers to one administrator; it can be handed only to an active one.
  const keepers = users.data
    ?.filter((u) => u.active && u.role === 'admin')
    .map((u) => ({ id: u.id, name: u.name }));
  const disabledCreators = new Set((users.data ?? []).filter((u) => !u.active).map((u) => u.id));
  return (
    <>
      <PageHeader
        title="API tokens"
        lead="Scripts and other systems send reviews and aggregates to the ingest API with a token. Each token acts with one role, optionally within some categories, until it is revoked."
      />
      <section aria-labelledby="new-token-heading" className="mb-8">
        <h2 id="new-token-heading" className="mb-3 text-lg font-bold">
          New token
        </h2>
        {categories.isError ? <ErrorPanel error={categories.error} /> : null}
        {categories.data ? <CreateTokenForm categories={categories.data} /> : null}
      </section>
      <section aria-labelledby="tokens-heading">
        <h2 id="tokens-heading" className="mb-3 text-lg font-bold">
          Tokens
        </h2>
        <WidgetBoundary label="tokens">
          {tokens.isPending ? <Loading /> : null}
          {tokens.isError ? <ErrorPanel error={tokens.error} /> : null}
          {tokens.data ? (
            <TokensTable tokens={tokens.data} keepers={keepers} disabledCreators={disabledCreators} />
          ) : null}
        </WidgetBoundary>
      </section>
    </>
  );
}

export const ErrorBoundary = RouteError;
