import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PortfolioEntry } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

/** Every category's latest week, or each category as of `week` (an ISO week such as 2026-W47). */
export function getPortfolio(week?: string): Promise<PortfolioEntry[]> {
  return api<PortfolioEntry[]>(week ? `/api/portfolio?week=${encodeURIComponent(week)}` : '/api/portfolio');
}

export const portfolioQueryOptions = (week?: string) =>
  queryOptions({ queryKey: queryKeys.portfolio.list(week), queryFn: () => getPortfolio(week) });

export function usePortfolio(week?: string) {
  return useQuery(portfolioQueryOptions(week));
}
