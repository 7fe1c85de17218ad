import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { ApiTokenRecord } from '../../../../shared/schemas/tokens.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function reassignToken({ id, userId }: { id: number; userId: number }): Promise<ApiTokenRecord> {
  return api<ApiTokenRecord>(`/api/admin/tokens/${id}/owner`, { method: 'PUT', body: { userId } });
}

export function useReassignToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: reassignToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.tokens.all }),
  });
}
