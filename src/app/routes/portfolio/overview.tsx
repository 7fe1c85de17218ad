import { Link, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { meQueryOptions, useMe } from '../../../features/auth/api/get-me';
import { portfolioQueryOptions, usePortfolio } from '../../../features/portfolio/api/get-portfolio';
import { PortfolioCard } from '../../../features/portfolio/components/portfolio-card';
import { queryClient } from '../../../lib/query-client';

/** `?week=2026-W47` (the link in a past week's portfolio digest) shows every category as of that week. */
function weekFrom(search: URLSearchParams): string | undefined {
  return search.get('week') ?? undefined;
}

export async function loader({ request }: LoaderFunctionArgs) {
  await Promise.all([
    queryClient.ensureQueryData(meQueryOptions()),
    queryClient.ensureQueryData(portfolioQueryOptions(weekFrom(new URL(request.url).searchParams))),
  ]);
  return null;
}

export function Component() {
  const { data: me } = useMe();
  const [search] = useSearchParams();
  const week = weekFrom(search);
  const portfolio = usePortfolio(week);
  const isManager = me?.role === 'manager';
  const latestWeek = portfolio.data
    ?.map((e) => e.latest?.isoWeek)
    .filter(Boolean)
    .sort()
    .at(-1);

  return (
    <>
      <PageHeader
        title={isManager ? 'My categories' : 'Overview'}
        lead={
          week ? (
            <>
              {isManager ? 'The categories you own' : 'Every category'} as of week {week}: each card shows
              that week&apos;s snapshot (or the one before it) and the twelve weeks up to it.{' '}
              <Link to="/" className="font-semibold text-brass-700 underline">
                Show the latest week
              </Link>
            </>
          ) : isManager ? (
            'The categories you own, as of their latest weekly snapshot. Open one to see its standings and tune its scoring.'
          ) : (
            `Every category as of its latest weekly snapshot${latestWeek ? ` (${latestWeek})` : ''}. Lines show the last twelve weeks.`
          )
        }
      />
      {portfolio.isPending ? <Loading label="Loading the portfolio…" /> : null}
      {portfolio.isError ? (
        <ErrorPanel error={portfolio.error} onRetry={() => void portfolio.refetch()} />
      ) : null}
      {portfolio.data && portfolio.data.length === 0 ? (
        <EmptyState title={isManager ? 'You do not own a category yet' : 'No categories yet'}>
          {isManager
            ? 'An administrator assigns categories to their managers.'
            : 'Categories appear here once data has been imported.'}
        </EmptyState>
      ) : null}
      {portfolio.data && portfolio.data.length > 0 ? (
        <WidgetBoundary label="portfolio">
          <ul className="grid gap-4 md:grid-cols-2 xl:grid-cols-3" aria-label="Categories">
            {portfolio.data.map((entry) => (
              <li key={entry.slug} className="relative">
                <PortfolioCard entry={entry} asOfWeek={week} />
              </li>
            ))}
          </ul>
        </WidgetBoundary>
      ) : null}
      <Caution />
    </>
  );
}

export const ErrorBoundary = RouteError;
