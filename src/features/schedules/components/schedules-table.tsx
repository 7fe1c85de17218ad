import { Link } from 'react-router-dom';
import type { CategorySummary } from '../../../../shared/auth';
import { countOf } from '../../../../shared/plural';
import { produceLabels, type ScheduleRecord } from '../../../../shared/schemas/schedules.schema';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useDeleteSchedule } from '../api/delete-schedule';
import { useRunScheduleNow } from '../api/run-schedule-now';
import { useSaveSchedule } from '../api/save-schedule';
import { formatZoned } from './zoned-time';

function categoryText(ids: number[] | null, categories: CategorySummary[]): string {
  if (ids === null) return 'All categories';
  const names = ids.map((id) => categories.find((c) => c.id === id)?.name ?? `#${id}`);
  return names.length > 2 ? `${names.slice(0, 2).join(', ')} +${names.length - 2}` : names.join(', ');
}

export function SchedulesTable({
  schedules,
  categories,
  onEdit,
}: {
  schedules: ScheduleRecord[];
  categories: CategorySummary[];
  onEdit: (schedule: ScheduleRecord) => void;
}) {
  const toggle = useSaveSchedule();
  const runNow = useRunScheduleNow();
  const remove = useDeleteSchedule();
  const error = toggle.error ?? runNow.error ?? remove.error;

  return (
    <>
      {runNow.data ? (
        <p role="status" className="mb-3 rounded-md bg-kelp-500/10 px-3 py-2 text-sm text-ink-900">
          Queued {countOf(runNow.data.runs.length, 'run')}.{' '}
          <Link to="/jobs" className="font-semibold underline">
            Follow them in job history
          </Link>
        </p>
      ) : null}
      {error ? (
        <p role="alert" className="mb-3 text-sm text-coral-500">
          {errorMessage(error)}
        </p>
      ) : null}
      <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
        <table className="w-full text-sm">
          <caption className="sr-only">Report schedules</caption>
          <thead className="bg-ink-50 text-left text-ink-700">
            <tr>
              <th scope="col" className="px-4 py-2">
                Schedule
              </th>
              <th scope="col" className="px-4 py-2">
                Runs
              </th>
              <th scope="col" className="px-4 py-2">
                Next run
              </th>
              <th scope="col" className="px-4 py-2">
                Categories
              </th>
              <th scope="col" className="px-4 py-2">
                Enabled
              </th>
              <th scope="col" className="px-4 py-2">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {schedules.map((s) => (
              <tr key={s.id} className="border-t border-ink-100 align-top">
                <th scope="row" className="px-4 py-3 text-left font-semibold text-ink-900">
                  {s.name}
                  <span className="block text-xs font-normal text-ink-500">{produceLabels[s.produce]}</span>
                </th>
                <td className="px-4 py-3">
                  <span className="block">{s.description}</span>
                  <span className="block font-mono text-xs text-ink-500">
                    {s.cron} · {s.timeZone}
                  </span>
                </td>
                <td className="whitespace-nowrap px-4 py-3 font-mono text-xs">
                  {s.nextRunAt ? (
                    <time dateTime={s.nextRunAt}>{formatZoned(s.nextRunAt)}</time>
                  ) : (
                    <span className="font-sans text-ink-500">Paused</span>
                  )}
                </td>
                <td className="px-4 py-3">{categoryText(s.categoryIds, categories)}</td>
                <td className="px-4 py-3">
                  <button
                    type="button"
                    role="switch"
                    aria-checked={s.enabled}
                    aria-label={`${s.name} enabled`}
                    disabled={toggle.isPending}
                    onClick={() => toggle.mutate({ id: s.id, enabled: !s.enabled })}
                    className={`relative inline-flex h-6 w-11 items-center rounded-full transition-colors ${s.enabled ? 'bg-kelp-500' : 'bg-ink-200'}`}
                  >
                    <span
                      aria-hidden
                      className={`inline-block h-5 w-5 rounded-full bg-white shadow transition-transform ${s.enabled ? 'translate-x-5' : 'translate-x-0.5'}`}
                    />
                  </button>
                </td>
                <td className="px-4 py-3">
                  <div className="flex justify-end gap-1 whitespace-nowrap">
                    <Button
                      variant="secondary"
                      disabled={runNow.isPending}
                      aria-label={`Run ${s.name} now`}
                      onClick={() => runNow.mutate({ id: s.id })}
                    >
                      Run now
                    </Button>
                    <Button variant="quiet" aria-label={`Edit ${s.name}`} onClick={() => onEdit(s)}>
                      Edit
                    </Button>
                    <Button
                      variant="quiet"
                      aria-label={`Delete ${s.name}`}
                      disabled={remove.isPending}
                      onClick={() => {
                        if (window.confirm(`Delete the schedule "${s.name}"? Its job history stays.`))
                          remove.mutate(s.id);
                      }}
                    >
                      Delete
                    </Button>
                  </div>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </>
  );
}
