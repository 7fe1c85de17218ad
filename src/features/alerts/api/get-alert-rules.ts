import { queryOptions, useQuery } from '@tanstack/react-query';
import type { AlertRuleSetting } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getAlertRules(slug: string): Promise<AlertRuleSetting[]> {
  return api<AlertRuleSetting[]>(`/api/categories/${encodeURIComponent(slug)}/alert-rules`);
}

export const alertRulesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: queryKeys.alerts.rules(slug), queryFn: () => getAlertRules(slug) });

export function useAlertRules(slug: string) {
  return useQuery(alertRulesQueryOptions(slug));
}
