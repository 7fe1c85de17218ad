import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AlertRuleSetting, SetAlertRuleInput } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type SetRuleVars = { slug: string; rule: string; input: SetAlertRuleInput };

export function setAlertRule({ slug, rule, input }: SetRuleVars): Promise<AlertRuleSetting[]> {
  return api<AlertRuleSetting[]>(`/api/categories/${encodeURIComponent(slug)}/alert-rules/${rule}`, {
    method: 'PUT',
    body: input,
  });
}

export function useSetAlertRule() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setAlertRule,
    onSuccess: (data, vars) => {
      queryClient.setQueryData(queryKeys.alerts.rules(vars.slug), data);
      void queryClient.invalidateQueries({ queryKey: queryKeys.alerts.settings() });
    },
  });
}
