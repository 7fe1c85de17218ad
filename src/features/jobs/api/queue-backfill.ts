import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { BackfillInput, JobRunRecord } from '../../../../shared/schemas/jobs.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function queueBackfill(input: BackfillInput): Promise<{ runs: JobRunRecord[] }> {
  return api<{ runs: JobRunRecord[] }>('/api/jobs/backfill', { method: 'POST', body: input });
}

export function useQueueBackfill() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: queueBackfill,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.jobs.all }),
  });
}
