import { useState } from 'react';
import { Link, useParams, useSearchParams, type LoaderFunctionArgs } from 'react-router-dom';
import type { AlertRuleSetting } from '../../../../shared/schemas/alerts.schema';
import { Button } from '../../../components/ui/button';
import { Caution } from '../../../components/ui/caution';
import { PageHeader } from '../../../components/ui/page-header';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { AlertList } from '../../../features/alerts/alert-list';
import { alertRulesQueryOptions, useAlertRules } from '../../../features/alerts/api/get-alert-rules';
import {
  categoryAlertsQueryOptions,
  useCategoryAlerts,
} from '../../../features/alerts/api/get-category-alerts';
import { useSetAlertRule } from '../../../features/alerts/api/set-alert-rule';
import { useMe } from '../../../features/auth/api/get-me';
import { queryClient } from '../../../lib/query-client';

export async function loader({ params }: LoaderFunctionArgs) {
  const slug = params.slug ?? '';
  await Promise.all([
    queryClient.ensureQueryData(alertRulesQueryOptions(slug)),
    queryClient.ensureQueryData(categoryAlertsQueryOptions(slug, 1)),
  ]);
  return null;
}

function RuleRow({ slug, rule, editable }: { slug: string; rule: AlertRuleSetting; editable: boolean }) {
  const [threshold, setThreshold] = useState(rule.threshold === null ? '' : String(rule.threshold));
  const [limit, setLimit] = useState(String(rule.dailyLimit));
  const save = useSetAlertRule();
  const send = (enabled: boolean) =>
    save.mutate({
      slug,
      rule: rule.rule,
      input: {
        enabled,
        dailyLimit: Number(limit),
        ...(rule.threshold === null ? {} : { threshold: Number(threshold) }),
      },
    });
  return (
    <tr data-testid={`rule-${rule.rule}`}>
      <td className="px-3 py-2 font-semibold">
        {rule.name}
        {rule.isDefault ? <span className="ml-2 text-xs font-normal text-ink-500">default</span> : null}
      </td>
      <td className="px-3 py-2">
        <label className="flex items-center gap-2">
          <input
            type="checkbox"
            checked={rule.enabled}
            disabled={!editable || save.isPending}
            onChange={(e) => send(e.target.checked)}
          />
          {rule.enabled ? 'On' : 'Off'}
        </label>
      </td>
      <td className="px-3 py-2">
        {rule.threshold === null ? (
          <span className="text-ink-500">—</span>
        ) : (
          <input
            aria-label={`Threshold of ${rule.name}`}
            className="w-20 rounded border border-ink-300 px-2 py-1"
            inputMode="numeric"
            disabled={!editable}
            value={threshold}
            onChange={(e) => setThreshold(e.target.value)}
          />
        )}
      </td>
      <td className="px-3 py-2">
        <input
          aria-label={`Daily limit of ${rule.name}`}
          className="w-20 rounded border border-ink-300 px-2 py-1"
          inputMode="numeric"
          disabled={!editable}
          value={limit}
          onChange={(e) => setLimit(e.target.value)}
        />
      </td>
      <td className="px-3 py-2 text-right">
        {editable ? (
          <Button variant="secondary" disabled={save.isPending} onClick={() => send(rule.enabled)}>
            Save
          </Button>
        ) : null}
        {save.isError ? <ErrorPanel error={save.error} /> : null}
      </td>
    </tr>
  );
}

export function Component() {
  const { slug = '' } = useParams();
  const [params, setParams] = useSearchParams();
  const page = Math.max(1, Number(params.get('page')) || 1);
  const { data: me } = useMe();
  const rules = useAlertRules(slug);
  const alerts = useCategoryAlerts(slug, page);
  const editable = me?.role === 'admin' || me?.role === 'manager';
  return (
    <>
      <PageHeader
        title="Alert rules and history"
        lead={
          <>
            Checked after every import and snapshot and once a day. An alert is raised once per rule, item and
            ISO week.{' '}
            <Link className="underline" to={`/categories/${encodeURIComponent(slug)}`}>
              Back to the category
            </Link>
          </>
        }
      />
      {rules.isPending ? <Loading /> : null}
      {rules.isError ? <ErrorPanel error={rules.error} /> : null}
      {rules.data ? (
        <div className="overflow-x-auto rounded-lg border border-ink-100 bg-white">
          <table className="w-full text-left text-sm">
            <thead className="bg-ink-900 text-xs uppercase text-paper">
              <tr>
                <th className="px-3 py-2">Rule</th>
                <th className="px-3 py-2">On</th>
                <th className="px-3 py-2">Threshold</th>
                <th className="px-3 py-2">Mails a day per person</th>
                <th className="px-3 py-2" />
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100">
              {rules.data.map((r) => (
                <RuleRow
                  key={`${r.rule}-${r.threshold}-${r.dailyLimit}-${r.enabled}`}
                  slug={slug}
                  rule={r}
                  editable={editable}
                />
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      <h2 className="mb-2 mt-6 text-lg font-semibold">History</h2>
      {alerts.isError ? <ErrorPanel error={alerts.error} /> : null}
      {alerts.data?.items.length === 0 ? <EmptyState title="No alerts in this category yet" /> : null}
      {alerts.data?.items.length ? <AlertList items={alerts.data.items} showCategory={false} /> : null}
      {alerts.data && alerts.data.total > page * 25 ? (
        <Button variant="secondary" className="mt-3" onClick={() => setParams({ page: String(page + 1) })}>
          Older
        </Button>
      ) : null}
      <Caution />
    </>
  );
}
