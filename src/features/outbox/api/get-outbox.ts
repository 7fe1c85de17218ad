import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { OutboxList } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getOutbox(page: number): Promise<OutboxList> {
  return api<OutboxList>(`/api/outbox?page=${page}&pageSize=50`);
}

export const outboxQueryOptions = (page: number) =>
  queryOptions({
    queryKey: queryKeys.outbox.list(page),
    queryFn: () => getOutbox(page),
    placeholderData: keepPreviousData,
  });

export function useOutbox(page: number) {
  return useQuery(outboxQueryOptions(page));
}
