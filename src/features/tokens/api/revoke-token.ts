import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ApiTokenRecord } from '../../../../shared/schemas/tokens.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function revokeToken(id: number): Promise<ApiTokenRecord> {
  return api<ApiTokenRecord>(`/api/admin/tokens/${id}`, { method: 'DELETE' });
}

export function useRevokeToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: revokeToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.tokens.all }),
  });
}
