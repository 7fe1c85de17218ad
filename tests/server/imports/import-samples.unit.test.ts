import { createReadStream } from 'node:fs';
import { readFile } from 'node:fs/promises';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { collectImport } from '../../../server/modules/imports/import-parser';
import { createIngestBodySchema } from '../../../shared/schemas/import.schema';

const now = new Date('2026-12-01T00:00:00Z');
const sample = (name: string) =>
  fileURLToPath(new URL(`../../../templates/imports/${name}`, import.meta.url));

describe('templates/imports samples', () => {
  it('reviews.sample.csv: 20 rows of 5 items, all accepted, titles inherited and a quoted line break kept', async () => {
    const result = await collectImport(createReadStream(sample('reviews.sample.csv')), 'reviews', { now });
    expect(result.errors).toEqual([]);
    expect(result.summary).toMatchObject({ rowsRead: 20, rowsValid: 20, rowsInvalid: 0, delimiter: ',' });
    expect(new Set(result.rows.map((r) => r.row.title)).size).toBe(5);
    const multiLine = result.rows.find((r) => r.row.reviewId === 'vbm-s-0006');
    expect(multiLine?.row.text).toBe(
      'Lid hinge cracked after a month.\nReplacement was sent quickly, though.',
    );
    expect(result.rows.find((r) => r.row.reviewId === 'vbm-s-0007')?.line).toBe(9);
  });

  it('aggregates.sample.csv: 10 rows, all accepted', async () => {
    const result = await collectImport(createReadStream(sample('aggregates.sample.csv')), 'aggregates', {
      now,
    });
    expect(result.errors).toEqual([]);
    expect(result.summary).toMatchObject({ rowsRead: 10, rowsValid: 10 });
    expect(result.rows.filter((r) => r.row.histogram === null)).toHaveLength(1);
  });

  it('reviews.with-mistakes.sample.csv: 13 rows read, 6 accepted, 7 rejected with these lines and reasons', async () => {
    const result = await collectImport(
      createReadStream(sample('reviews.with-mistakes.sample.csv')),
      'reviews',
      {
        now,
      },
    );
    expect(result.summary).toMatchObject({ rowsRead: 13, rowsValid: 6, rowsInvalid: 7 });
    expect(result.errors.map(({ line, column, reason }) => ({ line, column, reason }))).toEqual([
      { line: 4, column: 'stars', reason: 'stars must be a whole number from 1 to 5 (got "6")' },
      { line: 6, column: 'stars', reason: 'stars must be a whole number from 1 to 5 (got "five")' },
      { line: 7, column: 'reviewed_at', reason: 'reviewed_at is in the future (got "2099-05-01")' },
      {
        line: 8,
        column: 'reviewed_at',
        reason: 'reviewed_at is not a date in the form YYYY-MM-DD or YYYY-MM-DDTHH:mm:ssZ (got "12/03/2026")',
      },
      { line: 9, column: 'helpful_yes', reason: 'helpful_yes must be a whole number, 0 or more (got "-2")' },
      { line: 10, column: 'sku', reason: 'sku is missing' },
      { line: 11, column: 'review_id', reason: 'review_id already appeared on line 2' },
    ]);
    expect(result.rows.map((r) => r.line)).toEqual([2, 3, 5, 12, 13, 14]);
    const formula = result.rows.find((r) => r.line === 12)?.row;
    expect(formula?.text).toBe('=HYPERLINK("http://example.invalid","see photos")');
    expect(formula?.title).toBe('Lumholt Hand Trowel Classic');
  });

  it.each([
    ['reviews.sample.json', 'reviews', 4],
    ['aggregates.sample.json', 'aggregates', 3],
  ])('%s passes the ingest schema', async (name, kind, count) => {
    const body: unknown = JSON.parse(await readFile(sample(name), 'utf8'));
    const parsed = createIngestBodySchema(() => now).parse(body);
    expect(parsed.kind).toBe(kind);
    expect(parsed.rows).toHaveLength(count);
    for (const row of parsed.rows) expect(row.title).not.toBe('');
  });
});
