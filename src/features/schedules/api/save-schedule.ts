import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ScheduleInput, ScheduleRecord } from '../../../../shared/schemas/schedules.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

/** Creates a schedule, or changes one when `id` is given (PATCH sends only what it is given). */
export function saveSchedule({
  id,
  ...input
}: Partial<ScheduleInput> & { id?: number }): Promise<ScheduleRecord> {
  return id === undefined
    ? api<ScheduleRecord>('/api/schedules', { method: 'POST', body: input })
    : api<ScheduleRecord>(`/api/schedules/${id}`, { method: 'PATCH', body: input });
}

export function useSaveSchedule() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveSchedule,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.schedules.all }),
  });
}
