import { useState } from 'react';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Button } from '../../../components/ui/button';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { categoriesQueryOptions, useCategories } from '../../../features/categories/api/get-categories';
import { schedulesQueryOptions, useSchedules } from '../../../features/schedules/api/get-schedules';
import { ScheduleForm } from '../../../features/schedules/components/schedule-form';
import { SchedulesTable } from '../../../features/schedules/components/schedules-table';
import type { ScheduleRecord } from '../../../../shared/schemas/schedules.schema';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await Promise.all([
    queryClient.ensureQueryData(schedulesQueryOptions()),
    queryClient.ensureQueryData(categoriesQueryOptions()),
  ]);
  return null;
}

type Editing = { mode: 'closed' } | { mode: 'new' } | { mode: 'edit'; schedule: ScheduleRecord };

export function Component() {
  const schedules = useSchedules();
  const categories = useCategories();
  const [editing, setEditing] = useState<Editing>({ mode: 'closed' });
  const [saved, setSaved] = useState<string | null>(null);

  return (
    <>
      <PageHeader
        title="Schedules"
        lead="When Ballast takes the weekly snapshots, for which categories, and who hears about them. Times are read in each schedule's own time zone."
        actions={
          editing.mode === 'closed' ? (
            <Button onClick={() => setEditing({ mode: 'new' })}>New schedule</Button>
          ) : (
            <Button variant="secondary" onClick={() => setEditing({ mode: 'closed' })}>
              Close form
            </Button>
          )
        }
      />
      {saved ? (
        <p role="status" className="mb-4 text-sm text-kelp-500">
          {saved}
        </p>
      ) : null}
      {editing.mode !== 'closed' && categories.data ? (
        <section aria-labelledby="schedule-form-heading" className="mb-8">
          <h2 id="schedule-form-heading" className="mb-3 text-lg font-bold">
            {editing.mode === 'new' ? 'New schedule' : `Edit ${editing.schedule.name}`}
          </h2>
          <ScheduleForm
            key={editing.mode === 'edit' ? editing.schedule.id : 'new'}
            schedule={editing.mode === 'edit' ? editing.schedule : undefined}
            categories={categories.data}
            onDone={(s) => {
              setSaved(`Saved "${s.name}".`);
              setEditing({ mode: 'closed' });
            }}
          />
        </section>
      ) : null}
      <WidgetBoundary label="schedules">
        {schedules.isPending ? <Loading label="Loading schedules…" /> : null}
        {schedules.isError ? (
          <ErrorPanel error={schedules.error} onRetry={() => void schedules.refetch()} />
        ) : null}
        {schedules.data && schedules.data.length === 0 ? (
          <EmptyState title="No schedules yet">
            Create one to take the weekly snapshots automatically, for example every Monday at 06:00.
          </EmptyState>
        ) : null}
        {schedules.data && schedules.data.length > 0 ? (
          <SchedulesTable
            schedules={schedules.data}
            categories={categories.data ?? []}
            onEdit={(schedule) => setEditing({ mode: 'edit', schedule })}
          />
        ) : null}
      </WidgetBoundary>
    </>
  );
}

export const ErrorBoundary = RouteError;
