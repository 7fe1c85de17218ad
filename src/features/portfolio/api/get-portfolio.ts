import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PortfolioEntry } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getPortfolio(): Promise<PortfolioEntry[]> {
  return api<PortfolioEntry[]>('/api/portfolio');
}

export const portfolioQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.portfolio.list(), queryFn: getPortfolio });

export function usePortfolio() {
  return useQuery(portfolioQueryOptions());
}
