import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { createReviewCsvRowSchema, fastReviewCsvRow } from '../../../shared/schemas/import.schema';

const now = new Date('2026-11-30T12:00:00Z');
const clock = () => now;
const schema = createReviewCsvRowSchema(clock);

/** Cells near the edges of every rule: blanks, spaces, signs, bounds, odd dates, long values. */
const cell = (...values: string[]) =>
  fc.oneof(
    { arbitrary: fc.constant(values[0]!), weight: 14 },
    { arbitrary: fc.constantFrom(...values), weight: 4 },
    { arbitrary: fc.string({ maxLength: 6 }), weight: 1 },
  );
const row = fc.record(
  {
    review_id: cell('r-1', ' r-2 ', '', '  ', 'x'.repeat(128), 'x'.repeat(129)),
    sku: cell('GT-1', '', ' GT-2', 's'.repeat(64), 's'.repeat(65)),
    title: cell('Shears', '', '  ', 't'.repeat(500), 't'.repeat(501)),
    category: cell('garden-tools', 'Garden-Tools', ' garden-tools ', 'garden--tools', '-x', ''),
    stars: cell('1', '5', '0', '6', '+3', '-1', ' 4 ', 'five', '4.0', ''),
    reviewed_at: cell(
      '2026-06-02',
      '2026-06-02T10:11:12Z',
      '2026-06-02 10:11',
      '2026-11-30T23:59:59+14:00',
      '2026-12-01T03:00:00Z',
      '2099-01-01',
      '1990-01-01',
      '2026-02-30',
      '12/03/2026',
      '',
    ),
    helpful_yes: cell('0', '3', '-2', '', ' ', '100000000', '100000001', '1e3'),
    helpful_no: cell('0', '7', '', 'x'),
    reviewer_id: cell('rv-1', '', ' ', 'i'.repeat(129)),
    reviewer_score: cell('0', '1', '0.5', '.5', '1.01', '-0', 'abc', ''),
    verified: cell('true', 'FALSE', ' yes ', '1', '0', 'no', 'maybe', 'constructor', ''),
    text: cell('Fine.', '', '   ', '=SUM(A1)', 'x'.repeat(20_001)),
  },
  { requiredKeys: [] },
) as fc.Arbitrary<Record<string, string>>;

describe('fastReviewCsvRow', () => {
  it('accepts only rows the zod schema accepts, and reads them the same way', () => {
    let accepted = 0;
    fc.assert(
      fc.property(row, (cells) => {
        const fast = fastReviewCsvRow(cells, clock);
        if (fast === null) return;
        accepted++;
        const slow = schema.safeParse(cells);
        expect(slow.success).toBe(true);
        expect(fast).toEqual(slow.data);
      }),
      { numRuns: 5_000 },
    );
    expect(accepted).toBeGreaterThan(200);
  });

  it('takes the common clean row, so large files rarely need the slow path', () => {
    const cells = {
      review_id: 'r-1',
      sku: 'GT-1',
      title: 'Shears',
      category: 'garden-tools',
      stars: '4',
      reviewed_at: '2026-06-02T10:11:12Z',
      helpful_yes: '3',
      helpful_no: '0',
      reviewer_id: 'rv-1',
      reviewer_score: '0.7',
      verified: 'true',
      text: 'Clean cut.',
    };
    expect(fastReviewCsvRow(cells, clock)).toEqual(schema.parse(cells));
  });
});
