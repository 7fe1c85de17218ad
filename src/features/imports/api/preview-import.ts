import { useMutation } from '@tanstack/react-query';
import type { ImportKind } from '../../../../shared/schemas/import.schema';
import type { ImportPreview } from '../../../../shared/schemas/imports-api.schema';
import { upload } from '../../../lib/api-client';

/** The preview reads only the first rows, so only the start of a large file is sent. */
const previewBytes = 1024 * 1024;

export function previewImport({ file, kind }: { file: File; kind: ImportKind }): Promise<ImportPreview> {
  const form = new FormData();
  form.append('kind', kind);
  form.append('file', file.size > previewBytes ? file.slice(0, previewBytes) : file, file.name);
  return upload<ImportPreview>('/api/imports/preview', form);
}

export function usePreviewImport() {
  return useMutation({ mutationFn: previewImport });
}
