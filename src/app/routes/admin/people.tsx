import type { UserRecord } from '../../../../shared/admin';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { PageHeader } from '../../../components/ui/page-header';
import { ErrorPanel, Loading } from '../../../components/ui/status';
import { usersQueryOptions, useUsers } from '../../../features/admin/api/get-users';
import { CreateUserForm } from '../../../features/admin/components/create-user-form';
import { OwnershipPanel } from '../../../features/admin/components/ownership-panel';
import { UsersTable } from '../../../features/admin/components/users-table';
import { useMe } from '../../../features/auth/api/get-me';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import { tokensQueryOptions, useTokens } from '../../../features/tokens/api/get-tokens';
import { TokensOfCreator } from '../../../features/tokens/components/hand-over-token';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await Promise.all([
    queryClient.ensureQueryData(usersQueryOptions()),
    queryClient.ensureQueryData(categoriesQueryOptions()),
    queryClient.ensureQueryData(tokensQueryOptions()),
  ]);
  return null;
}

export function Component() {
  const { data: me } = useMe();
  const users = useUsers();
  const categories = useCategories();
  const tokens = useTokens();
  // Tokens can only be handed to an active administrator: the server refuses anyone else.
  const keepers = (users.data ?? [])
    .filter((u) => u.active && u.role === 'admin')
    .map((u) => ({ id: u.id, name: u.name }));
  const disableDetails = (user: UserRecord) =>
    tokens.isError ? (
      <ErrorPanel error={tokens.error} onRetry={() => void tokens.refetch()} />
    ) : tokens.data ? (
      <TokensOfCreator
        creatorName={user.name}
        tokens={tokens.data.filter((t) => t.createdById === user.id)}
        keepers={keepers.filter((k) => k.id !== user.id)}
      />
    ) : (
      <Loading label="Looking up their API tokens…" />
    );
  return (
    <>
      <PageHeader
        title="People & ownership"
        lead="Who can sign in, with which role, and which categories each manager owns."
      />
      <section aria-labelledby="add-heading" className="mb-8">
        <h2 id="add-heading" className="mb-3 text-lg font-bold">
          Add a person
        </h2>
        <CreateUserForm />
      </section>
      <section aria-labelledby="people-heading" className="mb-8">
        <h2 id="people-heading" className="mb-3 text-lg font-bold">
          People
        </h2>
        <WidgetBoundary label="people">
          {users.isPending ? <Loading /> : null}
          {users.isError ? <ErrorPanel error={users.error} /> : null}
          {users.data && me ? (
            <UsersTable users={users.data} selfId={me.id} disableDetails={disableDetails} />
          ) : null}
        </WidgetBoundary>
      </section>
      <section aria-labelledby="owners-heading">
        <h2 id="owners-heading" className="mb-3 text-lg font-bold">
          Category ownership
        </h2>
        <WidgetBoundary label="ownership">
          {categories.isError ? <ErrorPanel error={categories.error} /> : null}
          {users.data && categories.data ? (
            <OwnershipPanel users={users.data} categories={categories.data} />
          ) : null}
        </WidgetBoundary>
      </section>
    </>
  );
}

export const ErrorBoundary = RouteError;
