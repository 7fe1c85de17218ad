import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Webhook } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getWebhooks(): Promise<Webhook[]> {
  return api<Webhook[]>('/api/admin/webhooks');
}

export const webhooksQueryOptions = () =>
  queryOptions({
    queryKey: queryKeys.webhooks.list(),
    queryFn: getWebhooks,
    refetchInterval: (q) =>
      (q.state.data ?? []).some((w) => w.counts.queued + w.counts.sending > 0) ? 3000 : false,
  });

export function useWebhooks() {
  return useQuery(webhooksQueryOptions());
}
