import { queryOptions, useQuery } from '@tanstack/react-query';
import type { WeekSummary } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getWeeks(slug: string): Promise<WeekSummary[]> {
  return api<WeekSummary[]>(`/api/categories/${encodeURIComponent(slug)}/weeks`);
}

export const weeksQueryOptions = (slug: string) =>
  queryOptions({ queryKey: queryKeys.standings.weeks(slug), queryFn: () => getWeeks(slug) });

export function useWeeks(slug: string) {
  return useQuery(weeksQueryOptions(slug));
}
