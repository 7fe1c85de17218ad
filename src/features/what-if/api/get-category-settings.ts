import { queryOptions, useQuery } from '@tanstack/react-query';
import type { CategorySettings } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getCategorySettings(slug: string): Promise<CategorySettings> {
  return api<CategorySettings>(`/api/categories/${encodeURIComponent(slug)}/settings`);
}

export const categorySettingsQueryOptions = (slug: string) =>
  queryOptions({
    queryKey: queryKeys.categorySettings.detail(slug),
    queryFn: () => getCategorySettings(slug),
  });

export function useCategorySettings(slug: string) {
  return useQuery(categorySettingsQueryOptions(slug));
}
