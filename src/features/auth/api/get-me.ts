import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Me } from '../../../../shared/auth';
import { api, rememberSession } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export async function getMe(): Promise<Me> {
  const me = await api<Me>('/api/me', { redirectOn401: false });
  rememberSession(true);
  return me;
}

export const meQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.me, queryFn: getMe, staleTime: 60_000 });

export function useMe() {
  return useQuery(meQueryOptions());
}
