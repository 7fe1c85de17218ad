import { queryOptions, useQuery } from '@tanstack/react-query';
import type { WebhookDelivery } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getWebhookDeliveries(id: number): Promise<WebhookDelivery[]> {
  return api<WebhookDelivery[]>(`/api/admin/webhooks/${id}/deliveries`);
}

export const webhookDeliveriesQueryOptions = (id: number) =>
  queryOptions({
    queryKey: queryKeys.webhooks.deliveries(id),
    queryFn: () => getWebhookDeliveries(id),
    enabled: id > 0,
    refetchInterval: (q) =>
      (q.state.data ?? []).some((d) => d.status === 'queued' || d.status === 'sending') ? 3000 : false,
  });

export function useWebhookDeliveries(id: number) {
  return useQuery(webhookDeliveriesQueryOptions(id));
}
