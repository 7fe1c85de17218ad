import { queryOptions, useQuery } from '@tanstack/react-query';
import type { UnsubscribeInfo } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getUnsubscribe(token: string): Promise<UnsubscribeInfo> {
  return api<UnsubscribeInfo>(`/api/unsubscribe?token=${encodeURIComponent(token)}`, {
    redirectOn401: false,
  });
}

export const unsubscribeQueryOptions = (token: string) =>
  queryOptions({
    queryKey: queryKeys.subscriptions.unsubscribe(token),
    queryFn: () => getUnsubscribe(token),
    retry: false,
  });

export function useUnsubscribeInfo(token: string) {
  return useQuery(unsubscribeQueryOptions(token));
}
