import { queryOptions, useQuery } from '@tanstack/react-query';
import type { MyAlertSettings } from '../../../../shared/schemas/alerts.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getAlertSettings(): Promise<MyAlertSettings> {
  return api<MyAlertSettings>('/api/me/alert-settings');
}

export const alertSettingsQueryOptions = () =>
  queryOptions({ queryKey: queryKeys.alerts.settings(), queryFn: getAlertSettings });

export function useAlertSettings() {
  return useQuery(alertSettingsQueryOptions());
}
