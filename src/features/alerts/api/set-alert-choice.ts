import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { MyAlertSettings, SetAlertChoiceInput } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function setAlertChoice(input: SetAlertChoiceInput): Promise<MyAlertSettings> {
  return api<MyAlertSettings>('/api/me/alert-settings/choices', { method: 'PUT', body: input });
}

export function useSetAlertChoice() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setAlertChoice,
    onSuccess: (data) => queryClient.setQueryData(queryKeys.alerts.settings(), data),
  });
}
