import { Link } from 'react-router-dom';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { meQueryOptions, useMe } from '../../../features/auth/api/get-me';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await Promise.all([
    queryClient.ensureQueryData(meQueryOptions()),
    queryClient.ensureQueryData(categoriesQueryOptions()),
  ]);
  return null;
}

export function Component() {
  const { data: me } = useMe();
  const categories = useCategories();
  const isManager = me?.role === 'manager';

  return (
    <>
      <PageHeader
        title={isManager ? 'My categories' : 'Overview'}
        lead={
          isManager
            ? 'The categories you own. Their weekly digests and scoring settings are yours to read and tune.'
            : 'Every category in Ballast. Open one to see how its naive and smoothed orderings compare.'
        }
      />
      {categories.isPending ? <Loading /> : null}
      {categories.isError ? (
        <ErrorPanel error={categories.error} onRetry={() => void categories.refetch()} />
      ) : null}
      {categories.data && categories.data.length === 0 ? (
        <EmptyState title={isManager ? 'You do not own a category yet' : 'No categories yet'}>
          {isManager
            ? 'An administrator assigns categories to their managers.'
            : 'Categories appear here once data has been imported.'}
        </EmptyState>
      ) : null}
      {categories.data && categories.data.length > 0 ? (
        <ul className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3" aria-label="Categories">
          {categories.data.map((category) => (
            <li key={category.id}>
              <Link
                to={`/categories/${category.slug}`}
                className="block h-full rounded-lg border border-ink-100 bg-white p-5 shadow-sm transition hover:border-brass-500 hover:shadow"
              >
                <h2 className="text-lg font-bold text-ink-900">{category.name}</h2>
                <p className="mt-1 text-sm text-ink-500">{category.description}</p>
                <p className="mt-3 text-xs font-semibold uppercase tracking-wide text-ink-300">
                  {category.owners.length > 0
                    ? `Managed by ${category.owners.map((o) => o.name).join(', ')}`
                    : 'No manager assigned'}
                </p>
              </Link>
            </li>
          ))}
        </ul>
      ) : null}
      <Caution />
    </>
  );
}
