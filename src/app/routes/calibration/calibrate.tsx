import { useParams, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { useMe } from '../../../features/auth/api/get-me';
import { CalibrationWorkbench } from '../../../features/calibration/components/calibration-workbench';
import { categoryQueryOptions, useCategory } from '../../../features/categories/api/get-category';
import { weeksQueryOptions, useWeeks } from '../../../features/standings/api/get-weeks';
import { WeekPicker } from '../../../features/standings/components/week-picker';
import { useWhatIfEvidence } from '../../../features/what-if/api/get-what-if-evidence';
import { queryClient } from '../../../lib/query-client';

export async function loader({ params }: LoaderFunctionArgs) {
  const slug = params.slug ?? '';
  await Promise.all([
    queryClient.ensureQueryData(categoryQueryOptions(slug)),
    queryClient.ensureQueryData(weeksQueryOptions(slug)),
  ]);
  return null;
}

export function Component() {
  const { slug = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const week = params.get('week') ?? undefined;
  const category = useCategory(slug);
  const weeks = useWeeks(slug);
  const { data: me } = useMe();
  const hasWeeks = (weeks.data?.length ?? 0) > 0;
  const evidence = useWhatIfEvidence(slug, week);
  const canSave = me ? ['analyst', 'manager', 'admin'].includes(me.role) : false;

  if (category.isPending || weeks.isPending) return <Loading />;
  if (category.isError) return <ErrorPanel error={category.error} onRetry={() => void category.refetch()} />;
  if (weeks.isError) return <ErrorPanel error={weeks.error} onRetry={() => void weeks.refetch()} />;

  return (
    <>
      <PageHeader
        title={`Calibrate ${category.data.name}`}
        lead="Find the prior weight whose smoothed ordering agrees best with an ordering you observed elsewhere — a storefront listing or a partner's ranking — by Kendall's tau-b over every swap point."
        actions={
          hasWeeks ? (
            <WeekPicker
              weeks={weeks.data}
              value={week}
              onChange={(w) => {
                const next = new URLSearchParams(params);
                if (w) next.set('week', w);
                else next.delete('week');
                setParams(next);
              }}
            />
          ) : null
        }
      />
      {!hasWeeks ? (
        <EmptyState title="No weekly snapshot yet">
          Calibration needs a snapshotted week to compare with.
        </EmptyState>
      ) : evidence.isPending ? (
        <Loading label="Loading the week's evidence…" />
      ) : evidence.isError ? (
        <ErrorPanel error={evidence.error} onRetry={() => void evidence.refetch()} />
      ) : (
        <WidgetBoundary label="calibration">
          <CalibrationWorkbench
            key={evidence.data.isoWeek}
            slug={slug}
            evidence={evidence.data}
            canSave={canSave}
          />
        </WidgetBoundary>
      )}
      <Caution />
    </>
  );
}

export const ErrorBoundary = RouteError;
