import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { AlertPreferences, MyAlertSettings } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function setQuietHours(input: AlertPreferences): Promise<MyAlertSettings> {
  return api<MyAlertSettings>('/api/me/alert-settings/quiet-hours', { method: 'PUT', body: input });
}

export function useSetQuietHours() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setQuietHours,
    onSuccess: (data) => queryClient.setQueryData(queryKeys.alerts.settings(), data),
  });
}
