import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { JobList, JobStatus } from '../../../../shared/schemas/jobs.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export type JobFilter = { page: number; status?: JobStatus; category?: number };
export const JOBS_PAGE_SIZE = 25;

export function getJobs(filter: JobFilter): Promise<JobList> {
  const params = new URLSearchParams({ page: String(filter.page), pageSize: String(JOBS_PAGE_SIZE) });
  if (filter.status) params.set('status', filter.status);
  if (filter.category) params.set('category', String(filter.category));
  return api<JobList>(`/api/jobs?${params.toString()}`);
}

/** Polls every two seconds while any run is queued or running, and not at all otherwise. */
export const jobsQueryOptions = (filter: JobFilter) =>
  queryOptions({
    queryKey: queryKeys.jobs.list(filter),
    queryFn: () => getJobs(filter),
    placeholderData: keepPreviousData,
    refetchInterval: (query) => ((query.state.data?.active ?? 0) > 0 ? 2000 : false),
  });

export function useJobs(filter: JobFilter) {
  return useQuery(jobsQueryOptions(filter));
}
