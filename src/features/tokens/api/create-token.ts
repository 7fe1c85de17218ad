import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CreatedToken, CreateTokenInput } from '../../../../shared/schemas/tokens.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function createToken(input: CreateTokenInput): Promise<CreatedToken> {
  return api<CreatedToken>('/api/admin/tokens', { method: 'POST', body: input });
}

export function useCreateToken() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createToken,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.tokens.all }),
  });
}
