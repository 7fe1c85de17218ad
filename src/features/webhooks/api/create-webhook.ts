import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreatedWebhook, CreateWebhookInput } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function createWebhook(input: CreateWebhookInput): Promise<CreatedWebhook> {
  return api<CreatedWebhook>('/api/admin/webhooks', { method: 'POST', body: input });
}

export function useCreateWebhook() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createWebhook,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.webhooks.all }),
  });
}
