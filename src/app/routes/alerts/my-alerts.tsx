import { useState } from 'react';
import { useSearchParams } from 'react-router-dom';
import type { AlertPreferences } from '../../../../shared/schemas/alerts.schema';
import { Button } from '../../../components/ui/button';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { AlertList } from '../../../features/alerts/alert-list';
import { alertSettingsQueryOptions, useAlertSettings } from '../../../features/alerts/api/get-alert-settings';
import { myAlertsQueryOptions, useMyAlerts } from '../../../features/alerts/api/get-my-alerts';
import { useSetAlertChoice } from '../../../features/alerts/api/set-alert-choice';
import { useSetQuietHours } from '../../../features/alerts/api/set-quiet-hours';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await Promise.all([
    queryClient.ensureQueryData(alertSettingsQueryOptions()),
    queryClient.ensureQueryData(myAlertsQueryOptions(1)),
  ]);
  return null;
}

function QuietHours({ value }: { value: AlertPreferences }) {
  const [form, setForm] = useState(value);
  const save = useSetQuietHours();
  return (
    <form
      className="flex flex-wrap items-end gap-3 rounded-lg border border-ink-100 bg-white p-4 text-sm"
      onSubmit={(e) => {
        e.preventDefault();
        save.mutate(form);
      }}
    >
      <label className="flex flex-col gap-1">
        Time zone
        <input
          className="rounded border border-ink-300 px-2 py-1"
          value={form.timeZone}
          onChange={(e) => setForm({ ...form, timeZone: e.target.value })}
        />
      </label>
      <label className="flex flex-col gap-1">
        Quiet from
        <input
          type="time"
          className="rounded border border-ink-300 px-2 py-1"
          value={form.quietFrom}
          onChange={(e) => setForm({ ...form, quietFrom: e.target.value })}
        />
      </label>
      <label className="flex flex-col gap-1">
        until
        <input
          type="time"
          className="rounded border border-ink-300 px-2 py-1"
          value={form.quietUntil}
          onChange={(e) => setForm({ ...form, quietUntil: e.target.value })}
        />
      </label>
      <Button type="submit" disabled={save.isPending}>
        Save quiet hours
      </Button>
      <p className="w-full text-xs text-ink-500">
        Alert mail waits through these hours on your own clock and arrives in one mail after them. The same
        time twice means no quiet hours.
      </p>
      {save.isError ? <ErrorPanel error={save.error} /> : null}
      {save.isSuccess ? <p className="text-xs text-kelp-500">Saved.</p> : null}
    </form>
  );
}

export function Component() {
  const [params, setParams] = useSearchParams();
  const page = Math.max(1, Number(params.get('page')) || 1);
  const settings = useAlertSettings();
  const alerts = useMyAlerts(page);
  const choose = useSetAlertChoice();
  const byCategory = new Map<string, NonNullable<typeof settings.data>['choices']>();
  for (const c of settings.data?.choices ?? []) {
    byCategory.set(c.categoryName, [...(byCategory.get(c.categoryName) ?? []), c]);
  }
  return (
    <>
      <PageHeader
        title="Alerts"
        lead="What Ballast told you between digests, and which alerts you receive. Each alert links to its item and says what raised it."
      />
      <h2 className="mb-2 text-lg font-semibold">Quiet hours</h2>
      {settings.data ? (
        <QuietHours key={JSON.stringify(settings.data.preferences)} value={settings.data.preferences} />
      ) : null}
      <h2 id="choices" className="mb-2 mt-6 text-lg font-semibold">
        Alerts you receive
      </h2>
      {settings.isPending ? <Loading /> : null}
      {settings.isError ? <ErrorPanel error={settings.error} /> : null}
      {choose.isError ? <ErrorPanel error={choose.error} /> : null}
      <div className="grid gap-3 md:grid-cols-2">
        {[...byCategory.entries()].map(([name, choices]) => (
          <fieldset key={name} className="rounded-lg border border-ink-100 bg-white p-3 text-sm">
            <legend className="px-1 font-semibold">{name}</legend>
            {choices.map((c) => (
              <label key={c.rule} className="flex items-center gap-2 py-0.5">
                <input
                  type="checkbox"
                  checked={c.subscribed}
                  disabled={choose.isPending}
                  onChange={(e) =>
                    choose.mutate({ categoryId: c.categoryId, rule: c.rule, subscribed: e.target.checked })
                  }
                />
                {c.ruleName}
                {!c.ruleEnabled ? <span className="text-xs text-ink-500">(rule switched off)</span> : null}
              </label>
            ))}
          </fieldset>
        ))}
      </div>
      <h2 className="mb-2 mt-6 text-lg font-semibold">Your alert history</h2>
      {alerts.isError ? <ErrorPanel error={alerts.error} /> : null}
      {alerts.data?.items.length === 0 ? <EmptyState title="No alerts yet" /> : null}
      {alerts.data?.items.length ? <AlertList items={alerts.data.items} showCategory /> : null}
      {alerts.data && alerts.data.total > page * 25 ? (
        <Button variant="secondary" className="mt-3" onClick={() => setParams({ page: String(page + 1) })}>
          Older
        </Button>
      ) : null}
      <Caution />
    </>
  );
}
