import { useParams, type LoaderFunctionArgs } from 'react-router-dom';
import { RouteError } from '../../../components/errors/route-error';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { ErrorPanel, Loading } from '../../../components/ui/status';
import { categoryQueryOptions, useCategory } from '../../../features/categories/api/get-category';
import { queryClient } from '../../../lib/query-client';

export async function loader({ params }: LoaderFunctionArgs) {
  await queryClient.ensureQueryData(categoryQueryOptions(params.slug ?? ''));
  return null;
}

export function Component() {
  const { slug = '' } = useParams();
  const category = useCategory(slug);
  if (category.isPending) return <Loading />;
  if (category.isError) return <ErrorPanel error={category.error} onRetry={() => void category.refetch()} />;
  const { data } = category;
  return (
    <>
      <PageHeader title={data.name} lead={data.description} />
      <section aria-labelledby="owners-heading" className="rounded-lg border border-ink-100 bg-white p-5">
        <h2 id="owners-heading" className="text-sm font-bold uppercase tracking-wide text-ink-500">
          Category managers
        </h2>
        {data.owners.length === 0 ? (
          <p className="mt-2 text-sm text-ink-500">No manager is assigned to this category yet.</p>
        ) : (
          <ul className="mt-2 space-y-1 text-sm">
            {data.owners.map((owner) => (
              <li key={owner.id}>
                {owner.name} <span className="text-ink-500">· {owner.email}</span>
              </li>
            ))}
          </ul>
        )}
      </section>
      <Caution />
    </>
  );
}

export const ErrorBoundary = RouteError;
