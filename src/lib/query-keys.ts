/**
 * Every TanStack Query key of the client, from general to specific. Kept in one place because
 * a mutation in one feature (ownership) must invalidate the queries of another (categories).
 */
export const queryKeys = {
  me: ['me'] as const,
  categories: {
    all: ['categories'] as const,
    list: () => ['categories', 'list'] as const,
    detail: (slug: string) => ['categories', 'detail', { slug }] as const,
  },
  users: {
    all: ['users'] as const,
    list: () => ['users', 'list'] as const,
  },
  audit: {
    all: ['audit'] as const,
    list: (filter: { page: number; action?: string; actor?: string }) => ['audit', 'list', filter] as const,
  },
};
