import { z } from 'zod';
import {
  createAggregateJsonRowSchema,
  createReviewJsonRowSchema,
  importKinds,
  importLimits,
  rowErrorSchema,
} from './import.schema';

/*
 * The HTTP side of imports: upload fields, the preview, import batches and the token ingest API. The row
 * formats themselves live in import.schema.ts.
 */

export const importModes = ['all_or_nothing', 'valid_rows'] as const;
export type ImportMode = (typeof importModes)[number];

export const importModeLabels: Record<ImportMode, string> = {
  all_or_nothing: 'All or nothing',
  valid_rows: 'Import the valid rows',
};

export const importStatuses = ['queued', 'running', 'succeeded', 'failed', 'rejected'] as const;
export type ImportStatus = (typeof importStatuses)[number];

/** Rows shown by the preview. */
export const previewRowCount = 20;
/** Row errors kept per batch; the counts stay exact beyond it. */
export const storedRowErrorsMax = 10_000;

export const uploadFieldsSchema = z.object({
  kind: z.enum(importKinds, { error: 'kind must be reviews or aggregates' }),
  mode: z.enum(importModes, { error: 'mode must be all_or_nothing or valid_rows' }).default('all_or_nothing'),
});
export type UploadFields = z.infer<typeof uploadFieldsSchema>;

export const fileErrorSchema = z.object({
  code: z.string(),
  message: z.string(),
  line: z.number().int().nullable(),
});
export type FileError = z.infer<typeof fileErrorSchema>;

export const previewSchema = z.object({
  kind: z.enum(importKinds),
  fileName: z.string().nullable(),
  delimiter: z.enum(['comma', 'semicolon', 'tab']).nullable(),
  /** The file's header cells and the Ballast column each one maps to (null: ignored). */
  header: z.array(
    z.object({ position: z.number().int(), header: z.string(), column: z.string().nullable() }),
  ),
  rows: z.array(
    z.object({
      line: z.number().int(),
      /** The row as Ballast will store it, keyed by column; null when the row is rejected. */
      values: z.record(z.string(), z.string()).nullable(),
      error: rowErrorSchema.nullable(),
    }),
  ),
  /** True when the file has more rows than the preview shows. */
  more: z.boolean(),
  fileError: fileErrorSchema.nullable(),
  warnings: z.array(z.string()),
});
export type ImportPreview = z.infer<typeof previewSchema>;

export const importBatchSchema = z.object({
  id: z.number().int(),
  kind: z.enum(importKinds),
  source: z.enum(['upload', 'api', 'demo', 'command']),
  mode: z.enum(importModes),
  status: z.enum(importStatuses),
  fileName: z.string().nullable(),
  fileBytes: z.number().nullable(),
  bytesDone: z.number(),
  rowsRead: z.number().int(),
  rowsAccepted: z.number().int(),
  rowsRejected: z.number().int(),
  rowsInserted: z.number().int(),
  rowsUpdated: z.number().int(),
  errorMessage: z.string().nullable(),
  /** Name of the person or token that started it. */
  who: z.string().nullable(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});
export type ImportBatchRecord = z.infer<typeof importBatchSchema>;

export const importListQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export const ingestResultSchema = z.object({
  batchId: z.number().int(),
  status: z.enum(importStatuses),
  rowsRead: z.number().int(),
  rowsAccepted: z.number().int(),
  rowsRejected: z.number().int(),
  rowsInserted: z.number().int(),
  rowsUpdated: z.number().int(),
  /** `line` is the 1-based position of the row in `rows`. */
  errors: z.array(rowErrorSchema),
  errorMessage: z.string().nullable(),
});
export type IngestResult = z.infer<typeof ingestResultSchema>;

function documentedRows(row: z.ZodType) {
  // Rows are checked one by one by the import service (so "import the valid rows" can keep the good ones);
  // the published schema still shows the row shape.
  const items = z.toJSONSchema(row, { io: 'input', unrepresentable: 'any' });
  delete (items as { $schema?: string }).$schema;
  return z
    .array(z.record(z.string(), z.unknown()), { error: 'rows must be a list of objects' })
    .min(1, { error: 'rows is empty' })
    .max(importLimits.jsonRowsMax, { error: `at most ${importLimits.jsonRowsMax} rows per request` })
    .meta({ items });
}

const ingestMode = z
  .enum(importModes, { error: 'mode must be all_or_nothing or valid_rows' })
  .default('all_or_nothing')
  .meta({ description: 'all_or_nothing (default): any bad row and nothing is written.' });

export const ingestReviewsBodySchema = z.object({
  kind: z
    .literal('reviews', { error: 'this endpoint takes reviews; send aggregates to /api/ingest/aggregates' })
    .optional(),
  mode: ingestMode,
  rows: documentedRows(createReviewJsonRowSchema(() => new Date())),
});
export const ingestAggregatesBodySchema = z.object({
  kind: z
    .literal('aggregates', { error: 'this endpoint takes aggregates; send reviews to /api/ingest/reviews' })
    .optional(),
  mode: ingestMode,
  rows: documentedRows(createAggregateJsonRowSchema(() => new Date())),
});
export type IngestReviewsBody = z.input<typeof ingestReviewsBodySchema>;
