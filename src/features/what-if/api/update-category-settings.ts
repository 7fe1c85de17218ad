import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CategorySettings, ScoringSettingsInput } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function updateCategorySettings(
  slug: string,
  change: ScoringSettingsInput,
): Promise<CategorySettings> {
  return api<CategorySettings>(`/api/categories/${encodeURIComponent(slug)}/settings`, {
    method: 'PUT',
    body: change,
  });
}

export function useUpdateCategorySettings(slug: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (change: ScoringSettingsInput) => updateCategorySettings(slug, change),
    onSuccess: (saved) => {
      client.setQueryData(queryKeys.categorySettings.detail(slug), saved);
      void client.invalidateQueries({ queryKey: queryKeys.whatIf.all });
    },
  });
}
