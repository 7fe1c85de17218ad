import { z } from 'zod';

/** An ISO week label as people and URLs write it: 2026-W48. */
export const isoWeekSchema = z.string().regex(/^\d{4}-W\d{2}$/, 'Use an ISO week such as 2026-W48.');
