import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { Webhook } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function setWebhookEnabled(vars: { id: number; enabled: boolean }): Promise<Webhook> {
  return api<Webhook>(`/api/admin/webhooks/${vars.id}`, { method: 'PATCH', body: { enabled: vars.enabled } });
}

export function useSetWebhookEnabled() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setWebhookEnabled,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.webhooks.all }),
  });
}
