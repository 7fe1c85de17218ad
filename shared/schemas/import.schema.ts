import { z } from 'zod';
import { parseCalendarDate, parseInstant } from '../clock';
import { keyOf } from '../keys';

/*
 * Ballast's own import formats: review-level and aggregate-level rows, as CSV (snake_case headers, every
 * cell a string) and as JSON for the ingest API (camelCase keys, JSON-native values). Both paths share the
 * field rules below so that a row means the same whichever way it arrives.
 */

export const importKinds = ['reviews', 'aggregates'] as const;
export type ImportKind = (typeof importKinds)[number];

export const importLimits = {
  idMax: 128,
  skuMax: 64,
  titleMax: 500,
  textMax: 20_000,
  categoryMax: 64,
  countMax: 100_000_000,
  /** Dates before this are almost always a spreadsheet default (1899/1900/1970), not a real review. */
  earliestDate: '1995-01-01',
  /** The widest time-zone offset: a review dated "tomorrow" in Kiribati is not in the future. */
  futureToleranceMs: 14 * 60 * 60 * 1000,
  jsonRowsMax: 5_000,
} as const;

const graphemes = new Intl.Segmenter(undefined, { granularity: 'grapheme' });

/**
 * Yields where each grapheme cluster ends, reading the text in short windows: V8's segmenter costs time in
 * proportion to the whole string at every step, so one pass over a long text would be quadratic.
 */
function* graphemeEnds(text: string): Generator<number> {
  let start = 0;
  let width = 256;
  while (start < text.length) {
    let end = Math.min(text.length, start + width);
    // End between whole code points: half an emoji would end the cluster before it too early.
    if (end < text.length && /[\uD800-\uDBFF]/.test(text[end - 1]!)) end--;
    const segments = [...graphemes.segment(text.slice(start, end))];
    // The window's last cluster may go on past it, unless the window reaches the end of the text.
    const complete = end === text.length ? segments.length : segments.length - 1;
    if (complete === 0) {
      width *= 2;
      continue;
    }
    for (let i = 0; i < complete; i++) yield start + segments[i]!.index + segments[i]!.segment.length;
    start += segments[complete - 1]!.index + segments[complete - 1]!.segment.length;
    width = 256;
  }
}

/** Length as a person counts it: grapheme clusters, so one emoji or one accented letter is one character. */
export function graphemeLength(text: string): number {
  // Plain ASCII without CR (CRLF is the one ASCII cluster of two units) needs no segmenting.
  if (text.length <= 1 || !/[^ -~\t\n]/.test(text)) return text.length;
  let n = 0;
  for (const _ of graphemeEnds(text)) n++;
  return n;
}

/** The first `max` graphemes of a text; never splits an emoji or a letter from its accent. */
export function cutGraphemes(text: string, max: number): string {
  if (text.length <= max) return text;
  let n = 0;
  for (const end of graphemeEnds(text)) if (++n === max) return text.slice(0, end);
  return text;
}

/** The items table holds 500 code points; a title of 500 family emoji has more than that. */
function codePointsFit(text: string, max: number): boolean {
  if (text.length <= max) return true;
  let n = 0;
  for (const _ of text) if (++n > max) return false;
  return true;
}

/** Whether a trimmed title is within the limit (the schema's two rules on titles). */
export function titleFits(title: string): boolean {
  return codePointsFit(title, importLimits.titleMax);
}

/** NUL is not text: Ballast refuses it in every field, whether the row came as CSV or through the API. */
export function nulReason(field: string): string {
  return `${field} contains a NUL character (U+0000), which is not text; remove it and send the row again`;
}

/** Every field of a row (CSV cells or JSON values) that holds a NUL, worded for the row's error. */
export function nulProblems(cells: Record<string, unknown>): { column: string; message: string }[] {
  return Object.entries(cells)
    .filter(([, value]) => typeof value === 'string' && value.includes('\0'))
    .map(([column]) => ({ column, message: nulReason(column) }));
}

export interface ImportColumn {
  name: string;
  required: boolean;
}

export const reviewColumns = [
  { name: 'review_id', required: true },
  { name: 'sku', required: true },
  { name: 'title', required: true },
  { name: 'category', required: true },
  { name: 'stars', required: true },
  { name: 'reviewed_at', required: true },
  { name: 'helpful_yes', required: false },
  { name: 'helpful_no', required: false },
  { name: 'reviewer_id', required: false },
  { name: 'reviewer_score', required: false },
  { name: 'verified', required: false },
  { name: 'text', required: false },
] as const satisfies readonly ImportColumn[];

export const histogramColumns = ['stars_1', 'stars_2', 'stars_3', 'stars_4', 'stars_5'] as const;

export const aggregateColumns = [
  { name: 'sku', required: true },
  { name: 'title', required: true },
  { name: 'category', required: true },
  { name: 'observed_on', required: true },
  { name: 'review_count', required: true },
  { name: 'mean_stars', required: true },
  ...histogramColumns.map((name) => ({ name, required: false })),
  { name: 'newest_review_at', required: false },
] as const satisfies readonly ImportColumn[];

export type ReviewColumnName = (typeof reviewColumns)[number]['name'];
export type AggregateColumnName = (typeof aggregateColumns)[number]['name'];

export const columnsByKind: Record<ImportKind, readonly ImportColumn[]> = {
  reviews: reviewColumns,
  aggregates: aggregateColumns,
};

/** One problem with one row. `line` is the physical line where the record starts (header = line 1). */
export const rowErrorSchema = z.object({
  line: z.number().int(),
  column: z.string().optional(),
  reason: z.string(),
  raw: z.string().optional(),
});
export type RowError = z.infer<typeof rowErrorSchema>;

/** `YYYY-MM-DD` only; midnight UTC, or null for anything else (including 2026-02-30). The one clock: shared/clock.ts. */
export const parseIsoDate = parseCalendarDate;

/** A date (midnight UTC) or a date-time (UTC unless it names an offset), by the one clock in shared/clock.ts. */
export const parseTimestamp = parseInstant;

const earliest = parseIsoDate(importLimits.earliestDate)!;

/** Shared by every date field: the reason a parsed date is not acceptable, or null. */
function dateProblem(column: string, date: Date, now: Date): string | null {
  if (date.getTime() > now.getTime() + importLimits.futureToleranceMs) return `${column} is in the future`;
  if (date < earliest)
    return `${column} is before ${importLimits.earliestDate}; is it a spreadsheet default?`;
  return null;
}

/** "in the future" is relative to a clock the caller supplies, so tests and re-runs are reproducible. */
export type Clock = () => Date;

function timestampField(column: string, clock: Clock, dateOnly = false) {
  const hint = dateOnly ? 'YYYY-MM-DD' : 'YYYY-MM-DD or YYYY-MM-DDTHH:mm:ssZ';
  return z.string().transform((value, ctx) => {
    const date = dateOnly ? parseIsoDate(value) : parseTimestamp(value);
    if (!date) {
      ctx.addIssue({ code: 'custom', message: `${column} is not a date in the form ${hint}` });
      return z.NEVER;
    }
    const problem = dateProblem(column, date, clock());
    if (problem) {
      ctx.addIssue({ code: 'custom', message: problem });
      return z.NEVER;
    }
    return date;
  });
}

const slugPattern = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;
const decimalPattern = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$/;

const requiredText = (column: string, max: number) =>
  z
    .string({ error: `${column} is missing` })
    .overwrite(keyOf)
    .min(1, { error: `${column} is missing` })
    .max(max, { error: `${column} is longer than ${max} characters` });

/** Slugs are keys too: written exactly, never case-folded (`Garden-Tools` is not `garden-tools`). */
const categoryField = z
  .string({ error: 'category is missing' })
  .overwrite(keyOf)
  .min(1, { error: 'category is missing' })
  .max(importLimits.categoryMax, { error: `category is longer than ${importLimits.categoryMax} characters` })
  .regex(slugPattern, { error: 'category must be a slug: lowercase letters, digits and single hyphens' });

// Titles are stored in NFC, so an accent typed as a separate mark counts, and is kept, as one letter.
const optionalTitle = z
  .string()
  .trim()
  .transform((t) => t.normalize('NFC'))
  .superRefine((t, ctx) => {
    if (graphemeLength(t) > importLimits.titleMax)
      ctx.addIssue({ code: 'custom', message: `title is longer than ${importLimits.titleMax} characters` });
    else if (!codePointsFit(t, importLimits.titleMax))
      ctx.addIssue({
        code: 'custom',
        message:
          `title is too long to store: its emoji or accented letters are built from more than ` +
          `${importLimits.titleMax} Unicode code points`,
      });
  })
  .optional()
  .transform((value) => (value ? value : undefined));

const optionalId = (column: string) =>
  z
    .string()
    .overwrite(keyOf)
    .max(importLimits.idMax, { error: `${column} is longer than ${importLimits.idMax} characters` })
    .nullish()
    .transform((value) => (value ? value : null));

/** Review texts are kept exactly as written (no trimming) and cut at the cap rather than rejected. */
const textField = z
  .string()
  .nullish()
  .transform((value) => (value && value.trim() !== '' ? cutGraphemes(value, importLimits.textMax) : null));

// ---------------------------------------------------------------- CSV cells (strings in, typed out)

const blankToUndefined = (value: unknown) =>
  typeof value === 'string' && value.trim() === '' ? undefined : value;

const wholeNumberMessage = (column: string, min: number, max: number) =>
  max >= importLimits.countMax
    ? `${column} must be a whole number, ${min} or more`
    : `${column} must be a whole number from ${min} to ${max}`;

const cellWholeNumber = (column: string, min: number, max: number, fallback?: number) =>
  z.preprocess(
    (value) => blankToUndefined(value) ?? (fallback === undefined ? undefined : String(fallback)),
    z
      .string({ error: `${column} is missing` })
      .trim()
      .regex(/^[+-]?\d+$/, { error: wholeNumberMessage(column, min, max) })
      .transform(Number)
      .pipe(
        z
          .number()
          .min(min, { error: wholeNumberMessage(column, min, max) })
          .max(max, { error: wholeNumberMessage(column, min, max) }),
      ),
  );

const cellDecimal = (column: string, min: number, max: number) =>
  z
    .string()
    .trim()
    .regex(decimalPattern, { error: `${column} must be a number from ${min} to ${max}` })
    .transform(Number)
    .pipe(
      z
        .number()
        .min(min, { error: `${column} must be a number from ${min} to ${max}` })
        .max(max, { error: `${column} must be a number from ${min} to ${max}` }),
    );

const booleanWords: Record<string, boolean> = {
  true: true,
  yes: true,
  '1': true,
  false: false,
  no: false,
  '0': false,
};

const cellBoolean = (column: string) =>
  z.preprocess(
    blankToUndefined,
    z
      .string()
      .trim()
      .toLowerCase()
      .refine((value) => Object.hasOwn(booleanWords, value), {
        error: `${column} must be true/false, yes/no or 1/0`,
      })
      .transform((value) => booleanWords[value] ?? null)
      .optional()
      .transform((value) => value ?? null),
  );

const optionalCell = <T extends z.ZodType>(schema: T) =>
  z.preprocess(blankToUndefined, schema.optional()).transform((value) => value ?? null);

/** A validated review row, as the importer, the ingest API and the demo generator all produce it. */
export interface ReviewRow {
  reviewId: string;
  sku: string;
  title: string;
  category: string;
  stars: number;
  reviewedAt: Date;
  helpfulYes: number;
  helpfulNo: number;
  reviewerId: string | null;
  reviewerScore: number | null;
  verified: boolean | null;
  text: string | null;
}

/** A validated aggregate observation. `histogram` holds the counts of 1..5 stars, in that order. */
export interface AggregateRow {
  sku: string;
  title: string;
  category: string;
  observedOn: string;
  reviewCount: number;
  meanStars: number | null;
  histogram: [number, number, number, number, number] | null;
  newestReviewAt: Date | null;
}

/** Before the cross-row rule "title may be left blank after the first row of an item" is applied. */
export type ReviewRowDraft = Omit<ReviewRow, 'title'> & { title: string | undefined };
export type AggregateRowDraft = Omit<AggregateRow, 'title'> & { title: string | undefined };

export function createReviewCsvRowSchema(clock: Clock) {
  return z
    .object({
      review_id: requiredText('review_id', importLimits.idMax),
      sku: requiredText('sku', importLimits.skuMax),
      title: optionalTitle,
      category: categoryField,
      stars: cellWholeNumber('stars', 1, 5),
      reviewed_at: z.preprocess(
        blankToUndefined,
        z.string({ error: 'reviewed_at is missing' }).pipe(timestampField('reviewed_at', clock)),
      ),
      helpful_yes: cellWholeNumber('helpful_yes', 0, importLimits.countMax, 0),
      helpful_no: cellWholeNumber('helpful_no', 0, importLimits.countMax, 0),
      reviewer_id: optionalId('reviewer_id'),
      reviewer_score: optionalCell(cellDecimal('reviewer_score', 0, 1)),
      verified: cellBoolean('verified'),
      text: textField,
    })
    .transform((r): ReviewRowDraft => ({
      reviewId: r.review_id,
      sku: r.sku,
      title: r.title,
      category: r.category,
      stars: r.stars,
      reviewedAt: r.reviewed_at,
      helpfulYes: r.helpful_yes,
      helpfulNo: r.helpful_no,
      reviewerId: r.reviewer_id,
      reviewerScore: r.reviewer_score,
      verified: r.verified,
      text: r.text,
    }));
}

const wholePattern = /^[+-]?\d+$/;

function fastWhole(value: string | undefined, min: number, max: number, fallback?: number): number | null {
  if (value === undefined || value.trim() === '') return fallback ?? null;
  const text = value.trim();
  if (!wholePattern.test(text)) return null;
  const n = Number(text);
  return n >= min && n <= max ? n : null;
}

function fastKey(value: string | undefined, max: number): string | null {
  if (value === undefined) return null;
  const text = keyOf(value);
  return text.length >= 1 && text.length <= max ? text : null;
}

/**
 * The review CSV rules above, hand-written for speed on large files: returns the row when it is certainly
 * valid, and null whenever anything is off, so the zod schema then decides and words the reason. The unit
 * tests hold the two to the same answers.
 */
export function fastReviewCsvRow(cells: Record<string, string>, clock: Clock): ReviewRowDraft | null {
  const reviewId = fastKey(cells.review_id, importLimits.idMax);
  const sku = fastKey(cells.sku, importLimits.skuMax);
  const category = fastKey(cells.category, importLimits.categoryMax);
  if (reviewId === null || sku === null || category === null) return null;
  if (!slugPattern.test(category)) return null;
  let title: string | undefined;
  if (cells.title !== undefined) {
    const t = cells.title.trim().normalize('NFC');
    if (!codePointsFit(t, importLimits.titleMax)) return null;
    title = t === '' ? undefined : t;
  }
  const stars = fastWhole(cells.stars, 1, 5);
  if (stars === null) return null;
  const when = cells.reviewed_at;
  if (when === undefined || when.trim() === '') return null;
  const reviewedAt = parseTimestamp(when);
  if (!reviewedAt || dateProblem('reviewed_at', reviewedAt, clock()) !== null) return null;
  const helpfulYes = fastWhole(cells.helpful_yes, 0, importLimits.countMax, 0);
  const helpfulNo = fastWhole(cells.helpful_no, 0, importLimits.countMax, 0);
  if (helpfulYes === null || helpfulNo === null) return null;
  let reviewerId: string | null = null;
  if (cells.reviewer_id !== undefined) {
    const r = keyOf(cells.reviewer_id);
    if (r.length > importLimits.idMax) return null;
    reviewerId = r === '' ? null : r;
  }
  let reviewerScore: number | null = null;
  const score = cells.reviewer_score;
  if (score !== undefined && score.trim() !== '') {
    const text = score.trim();
    if (!decimalPattern.test(text)) return null;
    reviewerScore = Number(text);
    if (!(reviewerScore >= 0 && reviewerScore <= 1)) return null;
  }
  let verified: boolean | null = null;
  const flag = cells.verified;
  if (flag !== undefined && flag.trim() !== '') {
    const word = flag.trim().toLowerCase();
    if (!Object.hasOwn(booleanWords, word)) return null;
    verified = booleanWords[word]!;
  }
  const body = cells.text;
  const text = body !== undefined && body.trim() !== '' ? cutGraphemes(body, importLimits.textMax) : null;
  return {
    reviewId,
    sku,
    title,
    category,
    stars,
    reviewedAt,
    helpfulYes,
    helpfulNo,
    reviewerId,
    reviewerScore,
    verified,
    text,
  };
}

/** Decimal places written, so "4.3" may stand for anything that rounds to it. */
function roundingTolerance(written: string): number {
  const decimals = written.includes('.') ? written.split('.')[1]!.replace(/e.*$/i, '').length : 0;
  return 0.5 * 10 ** -decimals + 1e-9;
}

type Histogram = [number, number, number, number, number];

/** The cross-field rules of an aggregate observation; returns reasons keyed by column. */
export function aggregateProblems(a: {
  observedOn: Date;
  reviewCount: number;
  meanStars: number | null;
  meanWritten: string | null;
  histogram: (number | null)[] | null;
  newestReviewAt: Date | null;
}): { column: string; message: string }[] {
  const problems: { column: string; message: string }[] = [];
  if (a.reviewCount > 0 && a.meanStars === null)
    problems.push({ column: 'mean_stars', message: 'mean_stars is required when review_count is above 0' });
  if (a.reviewCount === 0 && a.meanStars !== null)
    problems.push({ column: 'mean_stars', message: 'mean_stars must be empty when review_count is 0' });
  if (a.histogram) {
    const given = a.histogram.filter((n) => n !== null).length;
    if (given !== 0 && given !== 5) {
      problems.push({ column: 'stars_1', message: 'stars_1..stars_5 must be all filled or all empty' });
    } else if (given === 5) {
      const counts = a.histogram as number[];
      const total = counts.reduce((s, n) => s + n, 0);
      if (total !== a.reviewCount) {
        problems.push({
          column: 'stars_1',
          message: `stars_1..stars_5 add up to ${total}, but review_count is ${a.reviewCount}`,
        });
      } else if (total > 0 && a.meanStars !== null) {
        const mean = counts.reduce((s, n, i) => s + n * (i + 1), 0) / total;
        if (Math.abs(mean - a.meanStars) > roundingTolerance(a.meanWritten ?? String(a.meanStars)))
          problems.push({
            column: 'mean_stars',
            message: `mean_stars ${a.meanStars} disagrees with the star counts, whose mean is ${mean.toFixed(3)}`,
          });
      }
    }
  }
  if (a.newestReviewAt) {
    if (a.reviewCount === 0)
      problems.push({
        column: 'newest_review_at',
        message: 'newest_review_at must be empty when review_count is 0',
      });
    else if (
      a.newestReviewAt.getTime() >=
      a.observedOn.getTime() + 24 * 3600 * 1000 + importLimits.futureToleranceMs
    )
      problems.push({ column: 'newest_review_at', message: 'newest_review_at is after observed_on' });
  }
  return problems;
}

function addAggregateProblems(
  ctx: z.RefinementCtx,
  problems: { column: string; message: string }[],
  path: (column: string) => PropertyKey[],
) {
  for (const p of problems) ctx.addIssue({ code: 'custom', message: p.message, path: path(p.column) });
}

export function createAggregateCsvRowSchema(clock: Clock) {
  return z
    .object({
      sku: requiredText('sku', importLimits.skuMax),
      title: optionalTitle,
      category: categoryField,
      observed_on: z.preprocess(
        blankToUndefined,
        z.string({ error: 'observed_on is missing' }).pipe(timestampField('observed_on', clock, true)),
      ),
      review_count: cellWholeNumber('review_count', 0, importLimits.countMax),
      mean_stars: z.preprocess(blankToUndefined, z.string().optional()),
      stars_1: optionalCell(cellWholeNumber('stars_1', 0, importLimits.countMax)),
      stars_2: optionalCell(cellWholeNumber('stars_2', 0, importLimits.countMax)),
      stars_3: optionalCell(cellWholeNumber('stars_3', 0, importLimits.countMax)),
      stars_4: optionalCell(cellWholeNumber('stars_4', 0, importLimits.countMax)),
      stars_5: optionalCell(cellWholeNumber('stars_5', 0, importLimits.countMax)),
      newest_review_at: optionalCell(z.string().pipe(timestampField('newest_review_at', clock))),
    })
    .superRefine((r, ctx) => {
      let meanStars: number | null = null;
      if (r.mean_stars !== undefined) {
        const parsed = cellDecimal('mean_stars', 1, 5).safeParse(r.mean_stars);
        if (!parsed.success) {
          ctx.addIssue({
            code: 'custom',
            message: 'mean_stars must be a number from 1 to 5',
            path: ['mean_stars'],
          });
          return;
        }
        meanStars = parsed.data;
      }
      const histogram = [r.stars_1, r.stars_2, r.stars_3, r.stars_4, r.stars_5];
      addAggregateProblems(
        ctx,
        aggregateProblems({
          observedOn: r.observed_on,
          reviewCount: r.review_count,
          meanStars,
          meanWritten: r.mean_stars?.trim() ?? null,
          histogram,
          newestReviewAt: r.newest_review_at,
        }),
        (column) => [column],
      );
    })
    .transform((r): AggregateRowDraft => ({
      sku: r.sku,
      title: r.title,
      category: r.category,
      observedOn: r.observed_on.toISOString().slice(0, 10),
      reviewCount: r.review_count,
      meanStars: r.mean_stars === undefined ? null : Number(r.mean_stars.trim()),
      histogram:
        r.stars_1 === null ? null : ([r.stars_1, r.stars_2, r.stars_3, r.stars_4, r.stars_5] as Histogram),
      newestReviewAt: r.newest_review_at,
    }));
}

// ---------------------------------------------------------------- JSON ingest (typed values in)

const wholeNumber = (column: string, min: number, max: number) =>
  z
    .number({ error: wholeNumberMessage(column, min, max) })
    .int({ error: wholeNumberMessage(column, min, max) })
    .min(min, { error: wholeNumberMessage(column, min, max) })
    .max(max, { error: wholeNumberMessage(column, min, max) });

export function createReviewJsonRowSchema(clock: Clock) {
  return z
    .object({
      reviewId: requiredText('reviewId', importLimits.idMax),
      sku: requiredText('sku', importLimits.skuMax),
      title: optionalTitle,
      category: categoryField,
      stars: wholeNumber('stars', 1, 5),
      reviewedAt: z.string({ error: 'reviewedAt is missing' }).pipe(timestampField('reviewedAt', clock)),
      helpfulYes: wholeNumber('helpfulYes', 0, importLimits.countMax).default(0),
      helpfulNo: wholeNumber('helpfulNo', 0, importLimits.countMax).default(0),
      reviewerId: optionalId('reviewerId'),
      reviewerScore: z
        .number({ error: 'reviewerScore must be a number from 0 to 1' })
        .min(0, { error: 'reviewerScore must be a number from 0 to 1' })
        .max(1, { error: 'reviewerScore must be a number from 0 to 1' })
        .nullish()
        .transform((value) => value ?? null),
      verified: z
        .boolean({ error: 'verified must be true or false' })
        .nullish()
        .transform((value) => value ?? null),
      text: textField,
    })
    .strict();
}

export function createAggregateJsonRowSchema(clock: Clock) {
  const count = (column: string) => wholeNumber(column, 0, importLimits.countMax);
  return z
    .object({
      sku: requiredText('sku', importLimits.skuMax),
      title: optionalTitle,
      category: categoryField,
      observedOn: z
        .string({ error: 'observedOn is missing' })
        .pipe(timestampField('observedOn', clock, true)),
      reviewCount: count('reviewCount'),
      meanStars: z
        .number({ error: 'meanStars must be a number from 1 to 5' })
        .min(1, { error: 'meanStars must be a number from 1 to 5' })
        .max(5, { error: 'meanStars must be a number from 1 to 5' })
        .nullish()
        .transform((value) => value ?? null),
      histogram: z
        .tuple(
          [
            count('histogram[0]'),
            count('histogram[1]'),
            count('histogram[2]'),
            count('histogram[3]'),
            count('histogram[4]'),
          ],
          {
            error: 'histogram must be five counts, for 1 to 5 stars',
          },
        )
        .nullish()
        .transform((value) => value ?? null),
      newestReviewAt: z
        .string()
        .pipe(timestampField('newestReviewAt', clock))
        .nullish()
        .transform((value) => value ?? null),
    })
    .strict()
    .superRefine((r, ctx) => {
      const jsonNames: Record<string, string> = {
        mean_stars: 'meanStars',
        stars_1: 'histogram',
        newest_review_at: 'newestReviewAt',
      };
      addAggregateProblems(
        ctx,
        aggregateProblems({
          observedOn: r.observedOn,
          reviewCount: r.reviewCount,
          meanStars: r.meanStars,
          meanWritten: null,
          histogram: r.histogram,
          newestReviewAt: r.newestReviewAt,
        }).map((p) => ({ column: jsonNames[p.column] ?? p.column, message: p.message })),
        (column) => [column],
      );
    })
    .transform((r): AggregateRowDraft => ({ ...r, observedOn: r.observedOn.toISOString().slice(0, 10) }));
}

/**
 * Rules that span rows of one file or one request: a review id appears once; an item's title must be
 * given on its first row and may be left blank afterwards (later rows inherit it).
 */
export class CrossRowRules {
  private readonly firstLineByKey = new Map<string, number>();
  private readonly titleByItem = new Map<string, string>();

  constructor(private readonly kind: ImportKind) {}

  /** The line of an earlier row with the same key, or undefined (and the key is remembered). */
  duplicateOf(key: string, line: number): number | undefined {
    const first = this.firstLineByKey.get(key);
    if (first === undefined) this.firstLineByKey.set(key, line);
    return first;
  }

  duplicateKey(row: ReviewRowDraft | AggregateRowDraft): string {
    return this.kind === 'reviews'
      ? (row as ReviewRowDraft).reviewId
      : `${row.category}\u0000${row.sku}\u0000${(row as AggregateRowDraft).observedOn}`;
  }

  duplicateReason(firstLine: number, firstIsIndex = false): string {
    const where = firstIsIndex ? `row ${firstLine}` : `line ${firstLine}`;
    return this.kind === 'reviews'
      ? `review_id already appeared on ${where}`
      : `this item already has an observation for observed_on on ${where}`;
  }

  /** Remembers a row's title (even if the row is otherwise invalid, it names the item) and returns the title to use. */
  resolveTitle(category: string, sku: string, title: string | undefined): string | undefined {
    const item = `${keyOf(category)}\u0000${keyOf(sku)}`;
    if (title !== undefined) {
      if (!this.titleByItem.has(item)) this.titleByItem.set(item, title);
      return title;
    }
    return this.titleByItem.get(item);
  }
}

export const titleMissingReason = 'title is missing: give it on the first row of each sku';

function ingestRows<T extends ReviewRowDraft | AggregateRowDraft, R>(kind: ImportKind, row: z.ZodType<T>) {
  return z
    .array(row)
    .min(1, { error: 'rows is empty' })
    .max(importLimits.jsonRowsMax, { error: `at most ${importLimits.jsonRowsMax} rows per request` })
    .transform((rows, ctx) => {
      const rules = new CrossRowRules(kind);
      const out: R[] = [];
      rows.forEach((r, index) => {
        for (const [key, value] of Object.entries(r))
          if (typeof value === 'string' && value.includes('\0'))
            ctx.addIssue({ code: 'custom', path: [index, key], message: nulReason(key) });
        const first = rules.duplicateOf(rules.duplicateKey(r), index);
        if (first !== undefined)
          ctx.addIssue({ code: 'custom', path: [index], message: rules.duplicateReason(first, true) });
        const title = rules.resolveTitle(r.category, r.sku, r.title);
        if (title === undefined)
          ctx.addIssue({ code: 'custom', path: [index, 'title'], message: titleMissingReason });
        out.push({ ...r, title: title ?? '' } as R);
      });
      return out;
    });
}

/**
 * Bodies of `POST` to the ingest API. The clock decides what "in the future" means; the default reads the
 * time at each parse.
 */
export function createIngestBodySchema(clock: Clock = () => new Date()) {
  return z.discriminatedUnion('kind', [
    z.object({
      kind: z.literal('reviews'),
      rows: ingestRows<ReviewRowDraft, ReviewRow>('reviews', createReviewJsonRowSchema(clock)),
    }),
    z.object({
      kind: z.literal('aggregates'),
      rows: ingestRows<AggregateRowDraft, AggregateRow>('aggregates', createAggregateJsonRowSchema(clock)),
    }),
  ]);
}

export const ingestBodySchema = createIngestBodySchema();
/** What a client sends (dates as ISO strings). */
export type IngestBodyInput = z.input<typeof ingestBodySchema>;
export type ReviewIngestRowInput = Extract<IngestBodyInput, { kind: 'reviews' }>['rows'][number];
export type AggregateIngestRowInput = Extract<IngestBodyInput, { kind: 'aggregates' }>['rows'][number];
/** What the server gets after validation. */
export type IngestBody =
  { kind: 'reviews'; rows: ReviewRow[] } | { kind: 'aggregates'; rows: AggregateRow[] };
