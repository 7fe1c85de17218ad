import { queryOptions, useQuery } from '@tanstack/react-query';
import type { ItemDetail } from '../../../../shared/schemas/standings.schema';
import { api } from '../../../lib/api-client';
import { queryKeys } from '../../../lib/query-keys';

export function getItem(slug: string, sku: string, week?: string): Promise<ItemDetail> {
  const query = week ? `?week=${encodeURIComponent(week)}` : '';
  return api<ItemDetail>(
    `/api/categories/${encodeURIComponent(slug)}/items/${encodeURIComponent(sku)}${query}`,
  );
}

export const itemQueryOptions = (slug: string, sku: string, week?: string) =>
  queryOptions({
    queryKey: queryKeys.standings.item(slug, sku, week),
    queryFn: () => getItem(slug, sku, week),
  });

export function useItem(slug: string, sku: string, week?: string) {
  return useQuery(itemQueryOptions(slug, sku, week));
}
