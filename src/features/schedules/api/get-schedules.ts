import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ScheduleRecord } from '../../../../shared/schemas/schedules.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getSchedules(): Promise<ScheduleRecord[]> {
  return api<ScheduleRecord[]>('/api/schedules');
}

export const schedulesQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.schedules.list(), queryFn: getSchedules });

export function useSchedules() {
  return useQuery(schedulesQueryOptions());
}
