import { queryOptions, useQuery } from '@tanstack/react-query';
import type { DigestRecord } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getPortfolioDigests(): Promise<DigestRecord[]> {
  return api<DigestRecord[]>('/api/portfolio/digests');
}

export const portfolioDigestsQueryOptions = (enabled = true) =>
  queryOptions({ queryKey: queryKeys.digests.portfolio(), queryFn: getPortfolioDigests, enabled });

export function usePortfolioDigests(enabled: boolean) {
  return useQuery(portfolioDigestsQueryOptions(enabled));
}
