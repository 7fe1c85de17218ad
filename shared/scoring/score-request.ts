import type { ScoreRequest } from '../schemas/score.schema';
import { scoreCategory } from './score-category';
import type { ItemInput, ScoreResult } from './types';

/**
 * Scores a request already parsed by scoreRequestSchema; the API route and the CLI both call this.
 * `defaultAsOf` is the caller's clock, used when the request names no cut-off.
 */
export function scoreRequest(request: ScoreRequest, defaultAsOf: Date): ScoreResult {
  const items: ItemInput[] = request.items.map((item) => {
    const base = { sku: item.sku, title: item.title ?? null };
    if (item.reviews) return { ...base, reviews: item.reviews };
    if (item.histogram)
      return { ...base, histogram: item.histogram, count: item.count ?? null, mean: item.mean ?? null };
    return { ...base, count: item.count ?? 0, mean: item.mean ?? null };
  });
  return scoreCategory(items, request.settings ?? {}, {
    asOf: request.asOf ?? defaultAsOf,
    previous: request.previous ?? null,
  });
}
