import { queryOptions, useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect } from 'react';
import type { ImportBatchRecord } from '../../../../shared/schemas/imports-api.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getImport(id: number): Promise<ImportBatchRecord> {
  return api<ImportBatchRecord>(`/api/imports/${id}`);
}

export const isRunning = (batch: ImportBatchRecord | undefined): boolean =>
  batch?.status === 'queued' || batch?.status === 'running';

/** Polls while the import runs; it carries on in the server if the page is closed. */
export const importQueryOptions = (id: number) =>
  queryOptions({
    queryKey: queryKeys.imports.detail(id),
    queryFn: () => getImport(id),
    refetchInterval: (query) => (isRunning(query.state.data) ? 700 : false),
  });

export function useImport(id: number | null) {
  const queryClient = useQueryClient();
  const query = useQuery({ ...importQueryOptions(id ?? 0), enabled: id !== null });
  const finished = query.data && !isRunning(query.data) ? query.data.status : null;
  useEffect(() => {
    // The history shows the final counts once the import is over.
    if (finished) void queryClient.invalidateQueries({ queryKey: queryKeys.imports.list() });
  }, [finished, id, queryClient]);
  return query;
}

export const errorsCsvUrl = (id: number): string => `/api/imports/${id}/errors.csv`;
