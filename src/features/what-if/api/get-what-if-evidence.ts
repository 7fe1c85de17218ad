import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { WhatIfEvidence } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getWhatIfEvidence(
  slug: string,
  week?: string,
  halfLifeDays?: number,
): Promise<WhatIfEvidence> {
  const params = new URLSearchParams();
  if (week) params.set('week', week);
  if (halfLifeDays) params.set('halfLifeDays', String(halfLifeDays));
  const query = params.toString();
  return api<WhatIfEvidence>(
    `/api/categories/${encodeURIComponent(slug)}/what-if${query ? `?${query}` : ''}`,
  );
}

export const whatIfEvidenceQueryOptions = (slug: string, week?: string, halfLifeDays?: number) =>
  queryOptions({
    queryKey: queryKeys.whatIf.evidence(slug, week, halfLifeDays),
    queryFn: () => getWhatIfEvidence(slug, week, halfLifeDays),
    placeholderData: keepPreviousData,
    staleTime: 5 * 60_000,
  });

export function useWhatIfEvidence(slug: string, week?: string, halfLifeDays?: number) {
  return useQuery(whatIfEvidenceQueryOptions(slug, week, halfLifeDays));
}
