import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ApiTokenRecord } from '../../../../shared/schemas/tokens.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getTokens(): Promise<ApiTokenRecord[]> {
  return api<ApiTokenRecord[]>('/api/admin/tokens');
}

export const tokensQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.tokens.list(), queryFn: getTokens });

export function useTokens() {
  return useQuery(tokensQueryOptions());
}
