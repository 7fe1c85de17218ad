import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { WebhookDelivery } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function resendWebhookDelivery(id: number): Promise<WebhookDelivery> {
  return api<WebhookDelivery>(`/api/admin/webhook-deliveries/${id}/resend`, { method: 'POST' });
}

export function useResendWebhookDelivery() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: resendWebhookDelivery,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.webhooks.all }),
  });
}
