import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { JobRunRecord } from '../../../../shared/schemas/jobs.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function retryJob(id: number): Promise<JobRunRecord> {
  return api<JobRunRecord>(`/api/jobs/${id}/retry`, { method: 'POST' });
}

export function useRetryJob() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: retryJob,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.jobs.all }),
  });
}
