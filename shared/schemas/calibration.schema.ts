import { z } from 'zod';
import { isoWeekSchema } from './iso-week.schema';

/** 50,000 lines is the largest ordering the bench holds to 5 s and 500 MB. */
export const maxObservedSkus = 50_000;

export const calibrationRequestSchema = z.object({
  category: z.string().min(1).max(120),
  week: isoWeekSchema.optional(),
  observed: z
    .array(z.string().trim().min(1).max(120))
    .min(2, 'Give at least two skus, best first.')
    .max(maxObservedSkus, `Give at most ${maxObservedSkus} skus.`),
});
export type CalibrationRequest = z.infer<typeof calibrationRequestSchema>;

const loose = z.record(z.string(), z.unknown());
export const calibrationResponseSchema = z.object({
  category: z.string(),
  isoWeek: z.string(),
  observedCount: z.number().int(),
  duplicateCount: z.number().int(),
  C: z.number(),
  matchedCount: z.number().int(),
  unmatched: z.array(z.string()),
  swapPointCount: z.number().int(),
  curve: z.array(loose),
  curveExact: z.boolean(),
  best: loose,
  strategies: z.array(loose),
  unexplained: z.array(loose),
});
export type CalibrationResponse = z.infer<typeof calibrationResponseSchema>;
