import { Link } from 'react-router-dom';
import { RouteError } from '../../../components/errors/route-error';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await queryClient.ensureQueryData(categoriesQueryOptions());
  return null;
}

export function Component() {
  const categories = useCategories();
  return (
    <>
      <PageHeader
        title="Calibration"
        lead="Choose the category whose observed ordering you want to explain with a prior weight."
      />
      {categories.isPending ? <Loading /> : null}
      {categories.isError ? (
        <ErrorPanel error={categories.error} onRetry={() => void categories.refetch()} />
      ) : null}
      {categories.data && categories.data.length === 0 ? (
        <EmptyState title="No category to calibrate" />
      ) : null}
      {categories.data && categories.data.length > 0 ? (
        <ul className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3" aria-label="Categories to calibrate">
          {categories.data.map((c) => (
            <li key={c.slug}>
              <Link
                to={`/categories/${c.slug}/calibrate`}
                className="block rounded-lg border border-ink-100 bg-white p-4 hover:border-brass-500"
              >
                <span className="font-bold text-ink-900">{c.name}</span>
                <span className="mt-1 block text-sm text-ink-500">{c.description}</span>
              </Link>
            </li>
          ))}
        </ul>
      ) : null}
    </>
  );
}

export const ErrorBoundary = RouteError;
