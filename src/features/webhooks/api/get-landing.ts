import { queryOptions, useQuery } from '@tanstack/react-query';
import type { LandingReceipt } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type LandingList = { items: LandingReceipt[]; total: number };

export function getLanding(): Promise<LandingList> {
  return api<LandingList>('/api/admin/landing');
}

export const landingQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.webhooks.landing(), queryFn: getLanding, refetchInterval: 5000 });

export function useLanding() {
  return useQuery(landingQueryOptions());
}
