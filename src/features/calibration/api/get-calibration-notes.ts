import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CalibrationNote } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCalibrationNotes(slug: string): Promise<CalibrationNote[]> {
  return api<CalibrationNote[]>(`/api/categories/${encodeURIComponent(slug)}/calibration-notes`);
}

export const calibrationNotesQueryOptions = (slug: string) =>
  queryOptions({ queryKey: queryKeys.calibrationNotes.list(slug), queryFn: () => getCalibrationNotes(slug) });

export function useCalibrationNotes(slug: string) {
  return useQuery(calibrationNotesQueryOptions(slug));
}
