import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DigestRecord } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCategoryDigests(slug: string): Promise<DigestRecord[]> {
  return api<DigestRecord[]>(`/api/categories/${encodeURIComponent(slug)}/digests`);
}

export const categoryDigestsQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: queryKeys.digests.category(slug),
    queryFn: () => getCategoryDigests(slug),
    enabled: !!slug,
  });

export function useCategoryDigests(slug: string) {
  return useQuery(categoryDigestsQueryOptions(slug));
}
