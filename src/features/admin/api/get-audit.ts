import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { AuditEntry } from '../../../../shared/admin';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type AuditFilter = { page: number; action?: string; actor?: string };

export function getAudit(filter: AuditFilter): Promise<{ items: AuditEntry[]; total: number }> {
  const params = new URLSearchParams({ page: String(filter.page), pageSize: '50' });
  if (filter.action) params.set('action', filter.action);
  if (filter.actor) params.set('actor', filter.actor);
  return api(`/api/admin/audit?${params.toString()}`);
}

export const auditQueryOptions = (filter: AuditFilter) =>
  queryOptions({
    queryKey: queryKeys.audit.list(filter),
    queryFn: () => getAudit(filter),
    placeholderData: keepPreviousData,
  });

export function useAudit(filter: AuditFilter) {
  return useQuery(auditQueryOptions(filter));
}
