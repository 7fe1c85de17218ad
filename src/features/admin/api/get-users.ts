import { queryOptions, useQuery } from '@tanstack/react-query';
import type { UserRecord } from '../../../../shared/admin';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getUsers(): Promise<UserRecord[]> {
  return api<UserRecord[]>('/api/admin/users');
}

export const usersQueryOptions = () => queryOptions({ queryKey: queryKeys.users.list(), queryFn: getUsers });

export function useUsers() {
  return useQuery(usersQueryOptions());
}
