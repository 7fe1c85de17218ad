import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CategorySummary } from '../../../../shared/auth';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCategories(): Promise<CategorySummary[]> {
  return api<CategorySummary[]>('/api/categories');
}

export const categoriesQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.categories.list(), queryFn: getCategories });

export function useCategories() {
  return useQuery(categoriesQueryOptions());
}
