import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { CategorySummary } from '../../../../shared/auth';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function setOwners({ slug, userIds }: { slug: string; userIds: number[] }): Promise<CategorySummary> {
  return api<CategorySummary>(`/api/admin/categories/${encodeURIComponent(slug)}/owners`, {
    method: 'PUT',
    body: { userIds },
  });
}

export function useSetOwners() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: setOwners,
    onSuccess: async () => {
      await queryClient.invalidateQueries({ queryKey: queryKeys.users.all });
      await queryClient.invalidateQueries({ queryKey: queryKeys.categories.all });
    },
  });
}
