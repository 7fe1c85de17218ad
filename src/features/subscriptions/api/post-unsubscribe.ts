import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { UnsubscribeResult } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function postUnsubscribe(token: string): Promise<UnsubscribeResult> {
  return api<UnsubscribeResult>('/api/unsubscribe', {
    method: 'POST',
    body: { token },
    redirectOn401: false,
  });
}

export function usePostUnsubscribe() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: postUnsubscribe,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.subscriptions.all }),
  });
}
