import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { AlertList } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getMyAlerts(page: number): Promise<AlertList> {
  return api<AlertList>(`/api/me/alerts?page=${page}&pageSize=25`);
}

export const myAlertsQueryOptions = (page: number) =>
  queryOptions({
    queryKey: queryKeys.alerts.mine(page),
    queryFn: () => getMyAlerts(page),
    placeholderData: keepPreviousData,
  });

export function useMyAlerts(page: number) {
  return useQuery(myAlertsQueryOptions(page));
}
