import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { Standings, StandingsQueryInput } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';
import { toQueryString } from './search-params';

export type StandingsView = {
  week?: string;
  sort: NonNullable<StandingsQueryInput['sort']>;
  dir: 'asc' | 'desc';
  flags?: string;
  q?: string;
  driftMin?: number;
  driftMax?: number;
  page: number;
  pageSize: number;
};

export function standingsPath(slug: string, view: StandingsView, format: '' | '.csv' | '.xlsx' = ''): string {
  const { page, pageSize, ...rest } = view;
  const paging = format === '' ? { page, pageSize } : {};
  return `/api/categories/${encodeURIComponent(slug)}/standings${format}${toQueryString({ ...rest, ...paging })}`;
}

export function getStandings(slug: string, view: StandingsView): Promise<Standings> {
  return api<Standings>(standingsPath(slug, view));
}

export const standingsQueryOptions = (slug: string, view: StandingsView) =>
  queryOptions({
    queryKey: queryKeys.standings.page(slug, view),
    queryFn: () => getStandings(slug, view),
    placeholderData: keepPreviousData,
  });

export function useStandings(slug: string, view: StandingsView) {
  return useQuery(standingsQueryOptions(slug, view));
}
