import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreateUserInput, UserRecord } from '../../../../shared/admin';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function createUser(input: CreateUserInput): Promise<UserRecord> {
  return api<UserRecord>('/api/admin/users', { method: 'POST', body: input });
}

export function useCreateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createUser,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.users.all }),
  });
}
