import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ImportKind } from '../../../../shared/schemas/import.schema';
import type { ImportBatchRecord, ImportMode } from '../../../../shared/schemas/imports-api.schema';
import { upload } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function startImport(input: {
  file: File;
  kind: ImportKind;
  mode: ImportMode;
}): Promise<ImportBatchRecord> {
  const form = new FormData();
  form.append('kind', input.kind);
  form.append('mode', input.mode);
  form.append('file', input.file, input.file.name);
  return upload<ImportBatchRecord>('/api/imports', form);
}

export function useStartImport() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: startImport,
    onSuccess: (batch) => {
      queryClient.setQueryData(queryKeys.imports.detail(batch.id), batch);
      return queryClient.invalidateQueries({ queryKey: queryKeys.imports.list() });
    },
  });
}
