import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function deleteSchedule(id: number): Promise<void> {
  return api<void>(`/api/schedules/${id}`, { method: 'DELETE' });
}

export function useDeleteSchedule() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: deleteSchedule,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.schedules.all }),
  });
}
