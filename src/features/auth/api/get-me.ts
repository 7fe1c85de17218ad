import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Me } from '../../../../shared/auth';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getMe(): Promise<Me> {
  return api<Me>('/api/me', { redirectOn401: false });
}

export const meQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.me, queryFn: getMe, staleTime: 60_000 });

export function useMe() {
  return useQuery(meQueryOptions());
}
