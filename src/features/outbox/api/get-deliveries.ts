import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { DeliveryList } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type DeliveryFilter = { page: number; status?: string };

export function getDeliveries(filter: DeliveryFilter): Promise<DeliveryList> {
  const params = new URLSearchParams({ page: String(filter.page), pageSize: '50' });
  if (filter.status) params.set('status', filter.status);
  return api<DeliveryList>(`/api/deliveries?${params.toString()}`);
}

export const deliveriesQueryOptions = (filter: DeliveryFilter) =>
  queryOptions({
    queryKey: queryKeys.deliveries.list(filter),
    queryFn: () => getDeliveries(filter),
    placeholderData: keepPreviousData,
    refetchInterval: (q) =>
      (q.state.data?.counts.queued ?? 0) + (q.state.data?.counts.sending ?? 0) > 0 ? 5000 : false,
  });

export function useDeliveries(filter: DeliveryFilter) {
  return useQuery(deliveriesQueryOptions(filter));
}
