import { zodResolver } from '@hookform/resolvers/zod';
import { useId } from 'react';
import { useForm } from 'react-hook-form';
import { countOf } from '../../../../shared/plural';
import type { CategorySummary } from '../../../../shared/auth';
import {
  backfillInputSchema,
  type BackfillFormValues,
  type BackfillInput,
} from '../../../../shared/schemas/jobs.schema';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useQueueBackfill } from '../api/queue-backfill';

const field = 'mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2 text-sm';
const label = 'text-sm font-semibold text-ink-800';
/** An empty week box means "from the first week with data" or "up to the last week that has ended". */
const emptyAsUnset = (v: unknown) => (typeof v === 'string' && v.trim() === '' ? undefined : v);

/**
 * Past weekly snapshots from imported history, for one category or all: one run per category in the
 * job history below, oldest week first, with its progress.
 */
export function BackfillForm({
  categories,
  lastWeek,
  onQueued,
}: {
  categories: CategorySummary[];
  lastWeek: string;
  onQueued: (runIds: number[]) => void;
}) {
  const id = useId();
  const queue = useQueueBackfill();
  const {
    register,
    handleSubmit,
    formState: { errors },
  } = useForm<BackfillFormValues, unknown, BackfillInput>({
    resolver: zodResolver(backfillInputSchema),
    defaultValues: { category: 'all', replace: false },
  });
  const submit = handleSubmit((values) =>
    queue.mutate(values, { onSuccess: ({ runs }) => onQueued(runs.map((r) => r.id)) }),
  );

  return (
    <form
      aria-labelledby={`${id}-title`}
      className="mb-6 rounded-lg border border-ink-100 bg-white p-4"
      onSubmit={(e) => void submit(e)}
      noValidate
    >
      <h2 id={`${id}-title`} className="text-base font-bold text-ink-900">
        Backfill past weeks
      </h2>
      <p className="mt-1 text-sm text-ink-500">
        Computes the weekly snapshots of past ISO weeks from the ratings already imported, oldest first, so
        timelines and movement have a history. Weeks that already have a snapshot are kept unless you ask to
        recompute them.
      </p>
      <div className="mt-3 grid gap-4 sm:grid-cols-3">
        <label className={label}>
          Category
          <select className={field} {...register('category')}>
            <option value="all">All categories</option>
            {categories.map((c) => (
              <option key={c.id} value={c.slug}>
                {c.name}
              </option>
            ))}
          </select>
        </label>
        <label className={label}>
          From week
          <input
            className={`${field} font-mono`}
            placeholder="first week with data"
            aria-invalid={errors.fromWeek ? true : undefined}
            aria-describedby={errors.fromWeek ? `${id}-from-error` : undefined}
            {...register('fromWeek', { setValueAs: emptyAsUnset })}
          />
          {errors.fromWeek ? (
            <span id={`${id}-from-error`} className="mt-1 block text-xs font-normal text-coral-500">
              {errors.fromWeek.message}
            </span>
          ) : null}
        </label>
        <label className={label}>
          To week
          <input
            className={`${field} font-mono`}
            placeholder={lastWeek}
            aria-invalid={errors.toWeek ? true : undefined}
            aria-describedby={errors.toWeek ? `${id}-to-error` : undefined}
            {...register('toWeek', { setValueAs: emptyAsUnset })}
          />
          {errors.toWeek ? (
            <span id={`${id}-to-error`} className="mt-1 block text-xs font-normal text-coral-500">
              {errors.toWeek.message}
            </span>
          ) : null}
        </label>
      </div>
      <label className="mt-3 flex items-center gap-2 text-sm">
        <input type="checkbox" className="h-4 w-4 accent-ink-900" {...register('replace')} />
        Recompute weeks that already have a snapshot
      </label>
      <div className="mt-4 flex items-center gap-3">
        <Button type="submit" disabled={queue.isPending}>
          {queue.isPending ? 'Queuing…' : 'Queue backfill'}
        </Button>
        {queue.isSuccess ? (
          <span role="status" className="text-sm text-ink-700">
            Queued {countOf(queue.data.runs.length, 'run')}; progress shows in the history below.
          </span>
        ) : null}
        {queue.isError ? (
          <span role="alert" className="text-sm text-coral-500">
            {errorMessage(queue.error)}
          </span>
        ) : null}
      </div>
    </form>
  );
}
