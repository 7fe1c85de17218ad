import { z } from 'zod';
import type { CategoryFigures, ResolvedParameters, WhatItTakesStatus } from '../scoring/types';
import { isoWeekSchema } from './iso-week.schema';

export const paperSizes = ['A4', 'LETTER'] as const;
export type PaperSize = (typeof paperSizes)[number];

export const digestKinds = ['category', 'portfolio'] as const;
export type DigestKind = (typeof digestKinds)[number];

/** One item of a weekly snapshot as a digest shows it (never any reviewer identifier). */
export type DigestItem = {
  sku: string;
  title: string;
  n: number;
  rawMean: number | null;
  smoothed: number;
  lowerBound: number;
  naiveRank: number;
  smoothedRank: number;
  drift: number;
  naiveMovement: number | null;
  smoothedMovement: number | null;
  newestAgeDays: number | null;
  medianAgeDays: number | null;
  recentShare: number | null;
  oneStarShare: number | null;
  stale: boolean;
  thin: boolean;
  negativeCluster: boolean;
  staleReason: string | null;
  clusterReason: string | null;
  clusterObserved: number | null;
  clusterExpected: number | null;
  clusterPValue: number | null;
  recurringPhrases: { phrase: string; count: number }[];
  whatItTakes: WhatItTakesStatus | string;
  reviewsToPass: number | null;
  aboveSku: string | null;
  aboveScore: number | null;
  /** 90 % rank range of the smoothed rank and its median; null (or absent) before rank intervals existed. */
  rankLow?: number | null;
  rankMedian?: number | null;
  rankHigh?: number | null;
};

/** The figures of the week before, for "what changed" and the portfolio comparison. */
export type DigestPreviousWeek = {
  isoWeek: string;
  itemCount: number;
  reviewCount: number;
  spearmanRho: number | null;
  kendallTauB: number | null;
  meanAbsDrift: number;
  maxAbsDrift: number;
  staleCount: number;
  thinCount: number;
  clusterCount: number;
  topTen: string[];
  /** Last week's rank ranges of this week's movers, by sku; absent where none was stored. */
  moverRanges?: Record<string, { low: number; high: number }>;
};

/** Everything the category digest layout needs, computed by the digests service. */
export type CategoryDigestData = {
  category: { slug: string; name: string; description: string };
  isoWeek: string;
  /** Monday and Sunday of the ISO week, YYYY-MM-DD. */
  weekStart: string;
  weekEnd: string;
  takenAt: string;
  generatedAt: string;
  webUrl: string;
  figures: CategoryFigures;
  params: ResolvedParameters;
  previous: DigestPreviousWeek | null;
  /** Level of the stored rank ranges; null or absent before they existed. */
  rankLevel?: number | null;
  /** Sorted by smoothed position. */
  items: DigestItem[];
  /** Plain sentences: the headline of the week and what changed since the week before. */
  story: { headline: string[]; changes: string[] };
};

export type PortfolioDigestData = {
  isoWeek: string;
  weekStart: string;
  weekEnd: string;
  generatedAt: string;
  webUrl: string;
  categories: CategoryDigestData[];
  story: string[];
};

/** Key figures repeated in the mail body. */
export type DigestKeyFigure = { label: string; value: string; note?: string };

/** What the mail of a digest says, stored with the PDF so every recipient gets the same words. */
export type DigestSummary = {
  title: string;
  kind: DigestKind;
  isoWeek: string;
  weekStart: string;
  weekEnd: string;
  categorySlug: string | null;
  categoryName: string | null;
  webUrl: string;
  keyFigures: DigestKeyFigure[];
  headline: string[];
  changes: string[];
  /** Portfolio only: one line per category. */
  categories: { name: string; slug: string; url: string; line: string }[];
};

export const digestRecordSchema = z.object({
  id: z.number().int(),
  kind: z.enum(digestKinds),
  categorySlug: z.string().nullable(),
  categoryName: z.string().nullable(),
  isoWeek: z.string(),
  paper: z.enum(paperSizes),
  sha256: z.string(),
  pageCount: z.number().int(),
  sizeBytes: z.number().int(),
  createdAt: z.string(),
  fileName: z.string(),
  previewUrl: z.string(),
  downloadUrl: z.string(),
  deliveries: z.object({ queued: z.number().int(), sent: z.number().int(), failed: z.number().int() }),
});
export type DigestRecord = z.infer<typeof digestRecordSchema>;

export const digestListSchema = z.array(digestRecordSchema);

export const pdfQuerySchema = z.object({
  disposition: z.enum(['inline', 'attachment']).default('attachment'),
});

export const produceDigestsSchema = z.object({
  isoWeek: isoWeekSchema,
  /** Category slugs; all categories with a snapshot of the week when absent. */
  categories: z.array(z.string()).max(200).optional(),
  /** Queue mail to subscribers (default) or only store the PDFs. */
  mail: z.boolean().default(true),
});
export type ProduceDigestsInput = z.input<typeof produceDigestsSchema>;

export const produceDigestsResultSchema = z.object({
  isoWeek: z.string(),
  digests: z.array(
    z.object({ id: z.number().int(), kind: z.enum(digestKinds), category: z.string().nullable() }),
  ),
  queued: z.number().int(),
  skipped: z.array(z.string()),
});
export type ProduceDigestsResult = z.infer<typeof produceDigestsResultSchema>;

/* Mail deliveries */

export const deliveryStatuses = ['queued', 'sending', 'sent', 'failed'] as const;
export type DeliveryStatus = (typeof deliveryStatuses)[number];

export const deliveryRecordSchema = z.object({
  id: z.number().int(),
  /** Null for an alert mail. */
  digestId: z.number().int().nullable(),
  digestLabel: z.string(),
  isoWeek: z.string(),
  recipient: z.string(),
  status: z.enum(deliveryStatuses),
  attempts: z.number().int(),
  nextAttemptAt: z.string().nullable(),
  lastError: z.string().nullable(),
  messageId: z.string(),
  sentAt: z.string().nullable(),
  createdAt: z.string(),
});
export type DeliveryRecord = z.infer<typeof deliveryRecordSchema>;

export const deliveryListQuerySchema = z.object({
  status: z.enum(deliveryStatuses).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type DeliveryListQuery = z.infer<typeof deliveryListQuerySchema>;

export const deliveryListSchema = z.object({
  items: z.array(deliveryRecordSchema),
  total: z.number().int(),
  counts: z.record(z.string(), z.number().int()),
});
export type DeliveryList = z.infer<typeof deliveryListSchema>;

/* Outbox of the local SMTP server */

export const outboxSummarySchema = z.object({
  id: z.number().int(),
  messageId: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  sizeBytes: z.number().int(),
  receivedAt: z.string(),
  copies: z.number().int(),
});
export type OutboxSummary = z.infer<typeof outboxSummarySchema>;

export const outboxListSchema = z.object({ items: z.array(outboxSummarySchema), total: z.number().int() });
export type OutboxList = z.infer<typeof outboxListSchema>;

export const outboxListQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

export const outboxDetailSchema = outboxSummarySchema.extend({
  text: z.string(),
  hasHtml: z.boolean(),
  htmlUrl: z.string(),
  headers: z.array(z.object({ name: z.string(), value: z.string() })),
  attachments: z.array(
    z.object({
      index: z.number().int(),
      fileName: z.string(),
      contentType: z.string(),
      sizeBytes: z.number().int(),
      url: z.string(),
    }),
  ),
});
export type OutboxDetail = z.infer<typeof outboxDetailSchema>;

/* Subscriptions */

export const subscriptionSchema = z.object({
  /** 'category:<id>' or 'portfolio'. */
  target: z.string(),
  label: z.string(),
  categorySlug: z.string().nullable(),
  subscribed: z.boolean(),
  /** True when no choice was made and the default applies (managers of a category, executives for the portfolio). */
  byDefault: z.boolean(),
});
export type Subscription = z.infer<typeof subscriptionSchema>;

export const setSubscriptionSchema = z.object({
  target: z.string().regex(/^(category:\d+|portfolio)$/, 'Unknown digest.'),
  subscribed: z.boolean(),
});
export type SetSubscriptionInput = z.infer<typeof setSubscriptionSchema>;

export const unsubscribeQuerySchema = z.object({ token: z.string().min(10).max(400) });
export const unsubscribeBodySchema = z.object({ token: z.string().min(10).max(400).optional() });

export const unsubscribeInfoSchema = z.object({
  email: z.string(),
  label: z.string(),
  used: z.boolean(),
  usedAt: z.string().nullable(),
  subscribed: z.boolean(),
});
export type UnsubscribeInfo = z.infer<typeof unsubscribeInfoSchema>;

export const unsubscribeResultSchema = z.object({
  outcome: z.enum(['unsubscribed', 'already_used']),
  email: z.string(),
  label: z.string(),
  message: z.string(),
});
export type UnsubscribeResult = z.infer<typeof unsubscribeResultSchema>;
