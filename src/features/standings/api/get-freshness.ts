import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Freshness } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';
import { toQueryString } from './search-params';

export function getFreshness(slug: string, week?: string): Promise<Freshness> {
  return api<Freshness>(`/api/categories/${encodeURIComponent(slug)}/freshness${toQueryString({ week })}`);
}

export const freshnessQueryOptions = (slug: string, week?: string) =>
  queryOptions({
    queryKey: queryKeys.standings.freshness(slug, week),
    queryFn: () => getFreshness(slug, week),
  });

export function useFreshness(slug: string, week?: string) {
  return useQuery(freshnessQueryOptions(slug, week));
}
