import { queryOptions, useQuery } from '@tanstack/react-query';
import type { JobRunDetail } from '../../../../shared/schemas/jobs.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getJob(id: number): Promise<JobRunDetail> {
  return api<JobRunDetail>(`/api/jobs/${id}`);
}

export const jobQueryOptions = (id: number) =>
  queryOptions({
    queryKey: queryKeys.jobs.detail(id),
    queryFn: () => getJob(id),
    refetchInterval: (query) => {
      const status = query.state.data?.status;
      return status === 'queued' || status === 'running' ? 2000 : false;
    },
  });

export function useJob(id: number) {
  return useQuery(jobQueryOptions(id));
}
