import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useId, useMemo, useState } from 'react';
import { Controller, useForm, useWatch } from 'react-hook-form';
import type { CategorySummary } from '../../../../shared/auth';
import {
  cronProblem,
  isTimeZone,
  produceKinds,
  produceLabels,
  scheduleInputSchema,
  type ScheduleInput,
  type ScheduleRecord,
  type ScheduleValues,
} from '../../../../shared/schemas/schedules.schema';
import { Button } from '../../../components/ui/button';
import { errorMessage } from '../../../components/ui/status';
import { useSchedulePreview } from '../api/get-schedule-preview';
import { useSaveSchedule } from '../api/save-schedule';
import { formatZoned } from './zoned-time';

const field = 'mt-1 w-full rounded-md border border-ink-200 bg-white px-3 py-2 text-sm';
const label = 'text-sm font-semibold text-ink-800';

function useDebounced<T>(value: T, ms: number): T {
  const [debounced, setDebounced] = useState(value);
  useEffect(() => {
    const timer = setTimeout(() => setDebounced(value), ms);
    return () => clearTimeout(timer);
  }, [value, ms]);
  return debounced;
}

function parseRecipients(text: string): string[] {
  return text
    .split(/[\s,;]+/)
    .map((s) => s.trim())
    .filter(Boolean);
}

const zones = (() => {
  try {
    return ['UTC', ...Intl.supportedValuesOf('timeZone')];
  } catch {
    return ['UTC', 'Europe/London', 'America/New_York'];
  }
})();

export function ScheduleForm({
  schedule,
  categories,
  onDone,
}: {
  schedule?: ScheduleRecord;
  categories: CategorySummary[];
  onDone: (saved: ScheduleRecord) => void;
}) {
  const id = useId();
  const save = useSaveSchedule();
  const defaults: ScheduleInput = schedule
    ? {
        name: schedule.name,
        cron: schedule.cron,
        timeZone: schedule.timeZone,
        categoryIds: schedule.categoryIds,
        recipients: schedule.recipients,
        produce: schedule.produce,
        enabled: schedule.enabled,
      }
    : {
        name: '',
        cron: '0 6 * * 1',
        timeZone: Intl.DateTimeFormat().resolvedOptions().timeZone || 'UTC',
        categoryIds: null,
        recipients: [],
        produce: 'snapshot',
        enabled: true,
      };
  const {
    register,
    handleSubmit,
    control,
    setValue,
    formState: { errors },
  } = useForm<ScheduleInput, unknown, ScheduleValues>({
    resolver: zodResolver(scheduleInputSchema),
    mode: 'onChange',
    defaultValues: defaults,
  });
  const [recipientText, setRecipientText] = useState((defaults.recipients ?? []).join(', '));
  const cron = useWatch({ control, name: 'cron' }) ?? '';
  const timeZone = useWatch({ control, name: 'timeZone' }) ?? '';
  const live = useDebounced({ cron: cron.trim().split(/\s+/).join(' '), tz: timeZone.trim() }, 250);
  const liveOk = useMemo(() => cronProblem(live.cron) === null && isTimeZone(live.tz), [live]);
  const preview = useSchedulePreview(live, liveOk);

  const onSubmit = handleSubmit((values) =>
    save.mutate({ ...values, ...(schedule ? { id: schedule.id } : {}) }, { onSuccess: onDone }),
  );
  const recipientsError = Array.isArray(errors.recipients)
    ? errors.recipients.find(Boolean)?.message
    : errors.recipients?.message;

  return (
    <form
      onSubmit={onSubmit}
      noValidate
      aria-label={schedule ? `Edit schedule ${schedule.name}` : 'New schedule'}
      className="grid gap-5 rounded-lg border border-ink-100 bg-white p-5 lg:grid-cols-[1fr_22rem]"
    >
      <div className="grid gap-4 sm:grid-cols-2">
        <div className="sm:col-span-2">
          <label htmlFor={`${id}-name`} className={label}>
            Name
          </label>
          <input
            id={`${id}-name`}
            className={field}
            aria-invalid={errors.name ? true : undefined}
            aria-describedby={errors.name ? `${id}-name-error` : undefined}
            {...register('name')}
          />
          {errors.name ? (
            <p id={`${id}-name-error`} className="mt-1 text-xs text-coral-500">
              {errors.name.message}
            </p>
          ) : null}
        </div>
        <div>
          <label htmlFor={`${id}-cron`} className={label}>
            Cron expression
          </label>
          <input
            id={`${id}-cron`}
            className={`${field} font-mono`}
            spellCheck={false}
            autoComplete="off"
            aria-invalid={errors.cron ? true : undefined}
            aria-describedby={`${id}-cron-help`}
            {...register('cron')}
          />
          <p id={`${id}-cron-help`} className="mt-1 text-xs" aria-live="polite">
            {errors.cron ? (
              <span role="alert" className="text-coral-500">
                {errors.cron.message}
              </span>
            ) : (
              <span className="text-ink-500">minute · hour · day of month · month · day of week</span>
            )}
          </p>
        </div>
        <div>
          <label htmlFor={`${id}-tz`} className={label}>
            Time zone
          </label>
          <input
            id={`${id}-tz`}
            list={`${id}-zones`}
            className={field}
            autoComplete="off"
            aria-invalid={errors.timeZone ? true : undefined}
            aria-describedby={errors.timeZone ? `${id}-tz-error` : undefined}
            {...register('timeZone')}
          />
          <datalist id={`${id}-zones`}>
            {zones.map((z) => (
              <option key={z} value={z} />
            ))}
          </datalist>
          {errors.timeZone ? (
            <p id={`${id}-tz-error`} role="alert" className="mt-1 text-xs text-coral-500">
              {errors.timeZone.message}
            </p>
          ) : null}
        </div>
        <Controller
          control={control}
          name="categoryIds"
          render={({ field: { value, onChange } }) => (
            <fieldset className="sm:col-span-2">
              <legend className={label}>Categories</legend>
              <div className="mt-1 flex flex-wrap gap-4 text-sm">
                <label className="flex items-center gap-2">
                  <input type="radio" checked={value === null} onChange={() => onChange(null)} />
                  All categories, including new ones
                </label>
                <label className="flex items-center gap-2">
                  <input type="radio" checked={value !== null} onChange={() => onChange([])} />
                  Chosen categories
                </label>
              </div>
              {value !== null ? (
                <div className="mt-2 grid gap-1 rounded-md border border-ink-100 p-3 text-sm sm:grid-cols-2">
                  {categories.map((c) => (
                    <label key={c.id} className="flex items-center gap-2">
                      <input
                        type="checkbox"
                        checked={(value ?? []).includes(c.id)}
                        onChange={(e) =>
                          onChange(
                            e.target.checked
                              ? [...(value ?? []), c.id]
                              : (value ?? []).filter((v) => v !== c.id),
                          )
                        }
                      />
                      {c.name}
                    </label>
                  ))}
                </div>
              ) : null}
              {errors.categoryIds ? (
                <p role="alert" className="mt-1 text-xs text-coral-500">
                  {errors.categoryIds.message}
                </p>
              ) : null}
            </fieldset>
          )}
        />
        <div className="sm:col-span-2">
          <label htmlFor={`${id}-recipients`} className={label}>
            Extra recipients
          </label>
          <textarea
            id={`${id}-recipients`}
            rows={2}
            className={field}
            placeholder="name@example.com, other@example.com"
            aria-describedby={`${id}-recipients-help`}
            aria-invalid={recipientsError ? true : undefined}
            value={recipientText}
            onChange={(e) => {
              setRecipientText(e.target.value);
              setValue('recipients', parseRecipients(e.target.value), { shouldValidate: true });
            }}
          />
          <p id={`${id}-recipients-help`} className="mt-1 text-xs">
            {recipientsError ? (
              <span role="alert" className="text-coral-500">
                {recipientsError}
              </span>
            ) : (
              <span className="text-ink-500">
                Besides the managers subscribed to each category. Separate addresses with commas.
              </span>
            )}
          </p>
        </div>
        <div>
          <label htmlFor={`${id}-produce`} className={label}>
            Produce
          </label>
          <select id={`${id}-produce`} className={field} {...register('produce')}>
            {produceKinds.map((p) => (
              <option key={p} value={p}>
                {produceLabels[p]}
              </option>
            ))}
          </select>
        </div>
        <div className="flex items-end">
          <label className="flex items-center gap-2 text-sm font-semibold text-ink-800">
            <input type="checkbox" {...register('enabled')} />
            Enabled
          </label>
        </div>
        <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
          <Button type="submit" disabled={save.isPending}>
            {schedule ? 'Save changes' : 'Create schedule'}
          </Button>
          {save.error ? (
            <p role="alert" className="text-sm text-coral-500">
              {errorMessage(save.error)}
            </p>
          ) : null}
        </div>
      </div>
      <section
        aria-labelledby={`${id}-preview`}
        aria-live="polite"
        className="self-start rounded-lg bg-paper p-4 ring-1 ring-ink-100"
      >
        <h3 id={`${id}-preview`} className="text-sm font-bold uppercase tracking-wide text-ink-500">
          When it runs
        </h3>
        {!liveOk ? (
          <p className="mt-2 text-sm text-ink-500">Fix the cron expression and time zone to see the runs.</p>
        ) : preview.isError ? (
          <p className="mt-2 text-sm text-coral-500">{errorMessage(preview.error)}</p>
        ) : preview.data ? (
          <>
            <p className="mt-2 text-base font-semibold text-ink-900" data-testid="cron-words">
              {preview.data.description}
            </p>
            <p className="text-xs text-ink-500">in {preview.data.timeZone}</p>
            <h4 className="mt-4 text-xs font-semibold text-ink-700">Next five runs</h4>
            <ol className="mt-1 space-y-1 font-mono text-xs text-ink-800" aria-label="Next five runs">
              {preview.data.nextRuns.map((iso) => (
                <li key={iso}>
                  <time dateTime={iso}>{formatZoned(iso)}</time>
                </li>
              ))}
            </ol>
          </>
        ) : (
          <p className="mt-2 text-sm text-ink-500">Reading the expression…</p>
        )}
      </section>
    </form>
  );
}
