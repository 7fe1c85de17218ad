import { queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxDetail } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getOutboxMessage(id: number): Promise<OutboxDetail> {
  return api<OutboxDetail>(`/api/outbox/${id}`);
}

export const outboxMessageQueryOptions = (id: number) =>
  queryOptions({
    queryKey: queryKeys.outbox.detail(id),
    queryFn: () => getOutboxMessage(id),
    enabled: id > 0,
  });

export function useOutboxMessage(id: number) {
  return useQuery(outboxMessageQueryOptions(id));
}
