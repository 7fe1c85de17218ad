import { Readable } from 'node:stream';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import {
  CSV_SLICE_ROWS,
  neutraliseCell,
  rejectedRowsCsv,
  toCsv,
  toCsvInSlices,
} from '../../../server/modules/imports/csv-safe';
import { collectImport } from '../../../server/modules/imports/import-parser';

describe('neutraliseCell', () => {
  it.each([
    ['=HYPERLINK("http://example.invalid")', `'=HYPERLINK("http://example.invalid")`],
    ['+1 great', `'+1 great`],
    ['-meh', `'-meh`],
    ['@home', `'@home`],
    ['\tindented', `'\tindented`],
    ['\rreturn', `'\rreturn`],
    ['plain = text', 'plain = text'],
    ['', ''],
  ])('writes %j as %j', (input, output) => {
    expect(neutraliseCell(input)).toBe(output);
  });

  it('leaves numbers, booleans and dates alone, negative numbers included', () => {
    expect(neutraliseCell(-3)).toBe('-3');
    expect(neutraliseCell(true)).toBe('true');
    expect(neutraliseCell(null)).toBe('');
    expect(neutraliseCell(new Date('2026-01-02T03:04:05Z'))).toBe('2026-01-02T03:04:05.000Z');
  });
});

describe('toCsv', () => {
  it('quotes what needs quoting, neutralises formulas and survives a round trip', () => {
    const rows = [
      { sku: 'KB-1', text: 'line one\nline two, with "quotes"', drift: -2 },
      { sku: '=cmd', text: '@SUM(A1:A2)', drift: 3 },
    ];
    const csv = toCsv(rows, [
      { header: 'sku', value: 'sku' },
      { header: 'text', value: 'text' },
      { header: 'drift', value: (r) => r.drift },
    ]);
    expect(parse(csv)).toEqual([
      ['sku', 'text', 'drift'],
      ['KB-1', 'line one\nline two, with "quotes"', '-2'],
      [`'=cmd`, `'@SUM(A1:A2)`, '3'],
    ]);
  });
});

describe('rejectedRowsCsv', () => {
  it('lists line, column, reason and raw, with formulas in the raw text neutralised', async () => {
    const input = [
      'review_id,sku,title,category,stars,reviewed_at,text',
      'r1,KB-1,Kettle,kettles,6,2026-01-01,fine',
      '=1+1,KB-1,Kettle,kettles,9,2026-01-01,fine',
    ].join('\n');
    const { errors } = await collectImport(Readable.from([Buffer.from(input)]), 'reviews', {
      now: new Date('2026-12-01T00:00:00Z'),
    });
    const csv = rejectedRowsCsv(errors);
    expect(csv.startsWith('\ufeff')).toBe(true);
    expect(parse(csv, { bom: true })).toEqual([
      ['line', 'column', 'reason', 'raw'],
      [
        '2',
        'stars',
        'stars must be a whole number from 1 to 5 (got "6")',
        'r1,KB-1,Kettle,kettles,6,2026-01-01,fine',
      ],
      [
        '3',
        'stars',
        'stars must be a whole number from 1 to 5 (got "9")',
        `'=1+1,KB-1,Kettle,kettles,9,2026-01-01,fine`,
      ],
    ]);
  });
});

describe('toCsvInSlices', () => {
  type Row = { id: number; text: string };
  const columns = [
    { header: 'id', value: 'id' as const },
    { header: 'text', value: 'text' as const },
  ];
  const rows: Row[] = Array.from({ length: 2_500 }, (_, i) => ({
    id: i,
    text: ['plain', 'with, comma', 'with "quotes"', 'two\nlines', '=formula', 'crlf\r\nend'][i % 6]!,
  }));

  it('writes exactly the text toCsv writes, with and without a byte order mark, and for no rows', async () => {
    expect(await toCsvInSlices(rows, columns, { bom: true })).toBe(toCsv(rows, columns, { bom: true }));
    expect(await toCsvInSlices(rows, columns)).toBe(toCsv(rows, columns));
    expect(await toCsvInSlices([], columns, { bom: true })).toBe(toCsv([], columns, { bom: true }));
    expect(await toCsvInSlices(rows.slice(0, CSV_SLICE_ROWS), columns)).toBe(
      toCsv(rows.slice(0, CSV_SLICE_ROWS), columns),
    );
  });

  it('lets the event loop run other work between slices', async () => {
    const order: string[] = [];
    const csv = toCsvInSlices(rows, columns).then(() => order.push('csv'));
    setImmediate(() => order.push('other'));
    await csv;
    expect(order).toEqual(['other', 'csv']);
  });
});
