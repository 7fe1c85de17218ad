import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UpdateUserInput, UserRecord } from '../../../../shared/admin';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function updateUser({ id, ...input }: UpdateUserInput & { id: number }): Promise<UserRecord> {
  return api<UserRecord>(`/api/admin/users/${id}`, { method: 'PATCH', body: input });
}

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: updateUser,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.users.all }),
  });
}
