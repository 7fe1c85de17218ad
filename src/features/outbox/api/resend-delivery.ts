import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { DeliveryRecord } from '../../../../shared/schemas/digests.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function resendDelivery(id: number): Promise<DeliveryRecord> {
  return api<DeliveryRecord>(`/api/deliveries/${id}/resend`, { method: 'POST' });
}

export function useResendDelivery() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: resendDelivery,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.deliveries.all }),
  });
}
