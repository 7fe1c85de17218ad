import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { AlertList } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCategoryAlerts(slug: string, page: number): Promise<AlertList> {
  return api<AlertList>(`/api/categories/${encodeURIComponent(slug)}/alerts?page=${page}&pageSize=25`);
}

export const categoryAlertsQueryOptions = (slug: string, page: number) =>
  queryOptions({
    queryKey: queryKeys.alerts.category(slug, page),
    queryFn: () => getCategoryAlerts(slug, page),
    placeholderData: keepPreviousData,
  });

export function useCategoryAlerts(slug: string, page: number) {
  return useQuery(categoryAlertsQueryOptions(slug, page));
}
