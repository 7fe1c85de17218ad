import { once } from 'node:events';
import { createWriteStream } from 'node:fs';
import { stringify } from 'csv-stringify/sync';
import { reviewColumns } from '../../shared/schemas/import.schema';
import type { ReviewRow } from '../../shared/schemas/import.schema';
import { Random } from './prng';
import { demoDefaultSeed, generateDemoScenario } from './scenario';

/*
 * Review rows back into Ballast's review CSV (the import format), one line at a time, so that the demo, the
 * samples under templates/ and the benches all go through the same parser as an uploaded file. These are
 * import files, so cells are written as they are, without the spreadsheet-safety quote of csv-safe.
 */

export const reviewCsvHeader: string[] = reviewColumns.map((c) => c.name);

export function reviewCsvRecord(row: ReviewRow): string[] {
  return [
    row.reviewId,
    row.sku,
    row.title,
    row.category,
    String(row.stars),
    row.reviewedAt.toISOString().replace('.000Z', 'Z'),
    String(row.helpfulYes),
    String(row.helpfulNo),
    row.reviewerId ?? '',
    row.reviewerScore === null ? '' : String(row.reviewerScore),
    row.verified === null ? '' : String(row.verified),
    row.text ?? '',
  ];
}

/** The header line, then one line per row (a quoted text may span several physical lines). */
export function* reviewCsvLines(rows: Iterable<ReviewRow>, batch = 500): Generator<string> {
  yield stringify([reviewCsvHeader]);
  let pending: string[][] = [];
  for (const row of rows) {
    pending.push(reviewCsvRecord(row));
    if (pending.length >= batch) {
      yield stringify(pending);
      pending = [];
    }
  }
  if (pending.length > 0) yield stringify(pending);
}

export async function writeReviewCsv(rows: Iterable<ReviewRow>, filePath: string): Promise<void> {
  const out = createWriteStream(filePath);
  for (const chunk of reviewCsvLines(rows)) if (!out.write(chunk)) await once(out, 'drain');
  out.end();
  await once(out, 'finish');
}

/**
 * Any number of plausible review rows over the demo's items, generated lazily (for benches that need far
 * more rows than the demo holds). Review ids are unique; dates fall in the year before `asOf`.
 */
export function* syntheticReviewRows(
  count: number,
  options: { asOf: Date; seed?: number },
): Generator<ReviewRow> {
  const seed = options.seed ?? demoDefaultSeed;
  const { items, reviews } = generateDemoScenario({ asOf: options.asOf, seed });
  const texts = reviews.map((r) => r.text).filter((t): t is string => t !== null);
  const rng = new Random(seed ^ 0x5eed);
  const end = options.asOf.getTime();
  for (let i = 0; i < count; i++) {
    const item = rng.pick(items);
    const stars = rng.weighted([0.05, 0.05, 0.1, 0.3, 0.5]) + 1;
    yield {
      reviewId: `syn-${String(i + 1).padStart(9, '0')}`,
      sku: item.sku,
      title: item.title,
      category: item.category,
      stars,
      reviewedAt: new Date(Math.floor((end - rng.float() * 365 * 86_400_000) / 1000) * 1000),
      helpfulYes: rng.chance(0.6) ? 0 : rng.int(1, 40),
      helpfulNo: rng.chance(0.8) ? 0 : rng.int(1, 10),
      reviewerId: `rv-${String(rng.int(1, 250_000)).padStart(6, '0')}`,
      reviewerScore: rng.chance(0.3) ? Math.round(rng.float() * 100) / 100 : null,
      verified: rng.chance(0.75),
      text: rng.chance(0.7) ? rng.pick(texts) : null,
    };
  }
}
