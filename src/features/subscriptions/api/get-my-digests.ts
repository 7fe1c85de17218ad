import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Subscription } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getMyDigests(): Promise<Subscription[]> {
  return api<Subscription[]>('/api/me/digests');
}

export const myDigestsQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.subscriptions.mine(), queryFn: getMyDigests });

export function useMyDigests() {
  return useQuery(myDigestsQueryOptions());
}
