import { describe, expect, it } from 'vitest';
import { createIngestBodySchema, parseTimestamp } from '../../../shared/schemas/import.schema';

const schema = createIngestBodySchema(() => new Date('2026-12-01T00:00:00Z'));
const review = (over: Record<string, unknown> = {}) => ({
  reviewId: 'r1',
  sku: 'KB-1',
  title: 'Kettle',
  category: 'kettles',
  stars: 4,
  reviewedAt: '2026-05-01T10:00:00Z',
  ...over,
});

function issues(body: unknown) {
  const result = schema.safeParse(body);
  expect(result.success).toBe(false);
  return result.success
    ? []
    : result.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
}

describe('ingest body schema', () => {
  it('fills defaults and inherits titles within a request', () => {
    const parsed = schema.parse({
      kind: 'reviews',
      rows: [review(), review({ reviewId: 'r2', title: undefined })],
    });
    if (parsed.kind !== 'reviews') throw new Error('expected reviews');
    expect(parsed.rows[1]).toMatchObject({
      title: 'Kettle',
      helpfulYes: 0,
      helpfulNo: 0,
      verified: null,
      text: null,
    });
    expect(parsed.rows[0]?.reviewedAt).toEqual(new Date('2026-05-01T10:00:00Z'));
  });

  it.each([
    [{ stars: 4.5 }, 'rows.0.stars', /whole number from 1 to 5/],
    [{ stars: '5' }, 'rows.0.stars', /whole number from 1 to 5/],
    [{ reviewedAt: '2027-01-01' }, 'rows.0.reviewedAt', /in the future/],
    [{ helpfulNo: -1 }, 'rows.0.helpfulNo', /0 or more/],
    [{ reviewerScore: 1.5 }, 'rows.0.reviewerScore', /from 0 to 1/],
    [{ sku: '' }, 'rows.0.sku', /sku is missing/],
    [{ title: undefined }, 'rows.0.title', /title is missing/],
    [{ colour: 'red' }, 'rows.0', /colour/],
  ])('rejects a review with %j', (over, path, message) => {
    const found = issues({ kind: 'reviews', rows: [review(over)] });
    expect(found).toContainEqual({ path, message: expect.stringMatching(message) });
  });

  it('rejects a duplicate review id, naming the first row', () => {
    expect(issues({ kind: 'reviews', rows: [review(), review()] })).toEqual([
      { path: 'rows.1', message: 'review_id already appeared on row 0' },
    ]);
  });

  it('checks aggregate histograms against count and mean', () => {
    const row = { sku: 'DL-1', title: 'Lamp', category: 'desk', observedOn: '2026-10-05', reviewCount: 5 };
    expect(
      schema.parse({ kind: 'aggregates', rows: [{ ...row, meanStars: 4.8, histogram: [0, 0, 0, 1, 4] }] })
        .rows,
    ).toHaveLength(1);
    expect(
      issues({ kind: 'aggregates', rows: [{ ...row, meanStars: 4.8, histogram: [0, 0, 0, 1, 3] }] }),
    ).toEqual([{ path: 'rows.0.histogram', message: 'stars_1..stars_5 add up to 4, but review_count is 5' }]);
    expect(issues({ kind: 'aggregates', rows: [{ ...row, meanStars: null }] })[0]?.path).toBe(
      'rows.0.meanStars',
    );
  });

  it('refuses an empty request and an unknown kind', () => {
    expect(issues({ kind: 'reviews', rows: [] })[0]?.message).toBe('rows is empty');
    expect(schema.safeParse({ kind: 'ratings', rows: [review()] }).success).toBe(false);
  });
});

describe('parseTimestamp', () => {
  it.each([
    ['2026-05-01', '2026-05-01T00:00:00.000Z'],
    ['2026-05-01T23:59:59.999-0130', '2026-05-02T01:29:59.999Z'],
    ['2024-02-29 12:00', '2024-02-29T12:00:00.000Z'],
  ])('reads %j', (text, iso) => {
    expect(parseTimestamp(text)?.toISOString()).toBe(iso);
  });

  it.each(['2025-02-29', '2026-13-01', '2026-05-01T24:00', '2026-05-01T10:00+15:00', '20260501', '2026-W18'])(
    'refuses %j',
    (text) => {
      expect(parseTimestamp(text)).toBeNull();
    },
  );
});
