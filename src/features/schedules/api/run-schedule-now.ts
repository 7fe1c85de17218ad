import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { JobRunRecord } from '../../../../shared/schemas/jobs.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function runScheduleNow(input: { id: number; replace?: boolean }): Promise<{ runs: JobRunRecord[] }> {
  return api(`/api/schedules/${input.id}/run-now`, {
    method: 'POST',
    body: { replace: input.replace ?? false },
  });
}

export function useRunScheduleNow() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: runScheduleNow,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.jobs.all }),
  });
}
