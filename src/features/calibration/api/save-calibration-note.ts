import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CalibrationNote, CalibrationNoteInput } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function saveCalibrationNote(slug: string, input: CalibrationNoteInput): Promise<CalibrationNote> {
  return api<CalibrationNote>(`/api/categories/${encodeURIComponent(slug)}/calibration-notes`, {
    method: 'POST',
    body: input,
  });
}

export function useSaveCalibrationNote(slug: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (input: CalibrationNoteInput) => saveCalibrationNote(slug, input),
    onSuccess: () => client.invalidateQueries({ queryKey: queryKeys.calibrationNotes.list(slug) }),
  });
}
