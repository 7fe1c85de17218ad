import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { SetSubscriptionInput, Subscription } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function setMyDigest(input: SetSubscriptionInput): Promise<Subscription[]> {
  return api<Subscription[]>('/api/me/digests', { method: 'PUT', body: input });
}

export function useSetMyDigest() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setMyDigest,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.subscriptions.all }),
  });
}
