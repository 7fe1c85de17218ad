import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ImportBatchRecord } from '../../../../shared/schemas/imports-api.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getImports(): Promise<ImportBatchRecord[]> {
  return api<ImportBatchRecord[]>('/api/imports?limit=50');
}

export const importsQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.imports.list(), queryFn: getImports });

export function useImports() {
  return useQuery(importsQueryOptions());
}
