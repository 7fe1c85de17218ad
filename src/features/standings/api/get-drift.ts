import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DriftChart } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';
import { toQueryString } from './search-params';

export function getDrift(slug: string, week?: string): Promise<DriftChart> {
  return api<DriftChart>(`/api/categories/${encodeURIComponent(slug)}/drift${toQueryString({ week })}`);
}

export const driftQueryOptions = (slug: string, week?: string) =>
  queryOptions({ queryKey: queryKeys.standings.drift(slug, week), queryFn: () => getDrift(slug, week) });

export function useDrift(slug: string, week?: string) {
  return useQuery(driftQueryOptions(slug, week));
}
