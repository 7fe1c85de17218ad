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
  digests: {
    all: ['digests'] as const,
    category: (slug: string) => ['digests', 'category', { slug }] as const,
    portfolio: () => ['digests', 'portfolio'] as const,
  },
  subscriptions: {
    all: ['subscriptions'] as const,
    mine: () => ['subscriptions', 'mine'] as const,
    unsubscribe: (token: string) => ['subscriptions', 'unsubscribe', { token }] as const,
  },
  outbox: {
    all: ['outbox'] as const,
    list: (page: number) => ['outbox', 'list', { page }] as const,
    detail: (id: number) => ['outbox', 'detail', { id }] as const,
  },
  deliveries: {
    all: ['deliveries'] as const,
    list: (filter: { page: number; status?: string }) => ['deliveries', 'list', filter] as const,
  },
  imports: {
    all: ['imports'] as const,
    list: () => ['imports', 'list'] as const,
    detail: (id: number) => ['imports', 'detail', { id }] as const,
  },
  tokens: {
    all: ['tokens'] as const,
    list: () => ['tokens', 'list'] as const,
  },
  portfolio: {
    all: ['portfolio'] as const,
    list: (week?: string) => ['portfolio', 'list', { week: week ?? null }] as const,
  },
  standings: {
    all: ['standings'] as const,
    weeks: (slug: string) => ['standings', 'weeks', { slug }] as const,
    page: (slug: string, query: Record<string, string | number | undefined>) =>
      ['standings', 'page', { slug, ...query }] as const,
    drift: (slug: string, week?: string) => ['standings', 'drift', { slug, week }] as const,
    freshness: (slug: string, week?: string) => ['standings', 'freshness', { slug, week }] as const,
    item: (slug: string, sku: string, week?: string) => ['standings', 'item', { slug, sku, week }] as const,
  },
  whatIf: {
    all: ['what-if'] as const,
    evidence: (slug: string, week?: string, halfLifeDays?: number) =>
      ['what-if', 'evidence', { slug, week, halfLifeDays }] as const,
  },
  categorySettings: {
    all: ['category-settings'] as const,
    detail: (slug: string) => ['category-settings', 'detail', { slug }] as const,
  },
  calibrationNotes: {
    all: ['calibration-notes'] as const,
    list: (slug: string) => ['calibration-notes', 'list', { slug }] as const,
  },
  schedules: {
    all: ['schedules'] as const,
    list: () => ['schedules', 'list'] as const,
    preview: (input: { cron: string; tz: string }) => ['schedules', 'preview', input] as const,
  },
  jobs: {
    all: ['jobs'] as const,
    list: (filter: { page: number; status?: string; category?: number }) => ['jobs', 'list', filter] as const,
    detail: (id: number) => ['jobs', 'detail', { id }] as const,
  },
  audit: {
    all: ['audit'] as const,
    list: (filter: { page: number; action?: string; actor?: string }) => ['audit', 'list', filter] as const,
  },
  alerts: {
    all: ['alerts'] as const,
    mine: (page: number) => ['alerts', 'mine', { page }] as const,
    settings: () => ['alerts', 'settings'] as const,
    rules: (slug: string) => ['alerts', 'rules', { slug }] as const,
    category: (slug: string, page: number) => ['alerts', 'category', { slug, page }] as const,
  },
  webhooks: {
    all: ['webhooks'] as const,
    list: () => ['webhooks', 'list'] as const,
    deliveries: (id: number) => ['webhooks', 'deliveries', { id }] as const,
    landing: () => ['webhooks', 'landing'] as const,
  },
};
