import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CategorySummary } from '../../../../shared/auth';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCategory(slug: string): Promise<CategorySummary> {
  return api<CategorySummary>(`/api/categories/${encodeURIComponent(slug)}`);
}

export const categoryQueryOptions = (slug: string) =>
  queryOptions({ queryKey: queryKeys.categories.detail(slug), queryFn: () => getCategory(slug) });

export function useCategory(slug: string) {
  return useQuery(categoryQueryOptions(slug));
}
