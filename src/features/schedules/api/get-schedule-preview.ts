import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import type { SchedulePreview } from '../../../../shared/schemas/schedules.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getSchedulePreview(input: { cron: string; tz: string }): Promise<SchedulePreview> {
  const params = new URLSearchParams({ cron: input.cron, tz: input.tz });
  return api<SchedulePreview>(`/api/schedules/preview?${params.toString()}`);
}

export const schedulePreviewQueryOptions = (input: { cron: string; tz: string }) =>
  queryOptions({
    queryKey: queryKeys.schedules.preview(input),
    queryFn: () => getSchedulePreview(input),
    staleTime: 30_000,
    placeholderData: keepPreviousData,
    retry: false,
  });

export function useSchedulePreview(input: { cron: string; tz: string }, enabled: boolean) {
  return useQuery({ ...schedulePreviewQueryOptions(input), enabled });
}
