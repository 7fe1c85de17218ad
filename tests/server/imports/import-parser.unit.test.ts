import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import {
  ImportFileError,
  collectImport,
  parseImport,
  sniffDelimiter,
} from '../../../server/modules/imports/import-parser';
import { cutGraphemes, graphemeLength, nulReason } from '../../../shared/schemas/import.schema';
import type { ImportKind } from '../../../shared/schemas/import.schema';

const now = new Date('2026-12-01T12:00:00Z');
const header =
  'review_id,sku,title,category,stars,reviewed_at,helpful_yes,helpful_no,reviewer_id,reviewer_score,verified,text';

function source(content: string | Buffer, chunkSize = 7): Readable {
  const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
  const chunks: Buffer[] = [];
  for (let i = 0; i < bytes.length; i += chunkSize) chunks.push(bytes.subarray(i, i + chunkSize));
  return Readable.from(chunks);
}

function reviews(lines: string[], head = header) {
  return collectImport(source([head, ...lines].join('\n') + '\n'), 'reviews', { now });
}

async function fileError(content: string | Buffer, kind: ImportKind = 'reviews', maxBytes?: number) {
  try {
    await collectImport(source(content), kind, { now, ...(maxBytes ? { maxBytes } : {}) });
  } catch (error) {
    expect(error).toBeInstanceOf(ImportFileError);
    return error as ImportFileError;
  }
  throw new Error('expected the file to be refused');
}

const good = (
  id: string,
  extra: Partial<Record<'stars' | 'at' | 'yes' | 'no' | 'score' | 'sku', string>> = {},
) =>
  `${id},${extra.sku ?? 'KB-1'},Keelwood Kettle,kettles,${extra.stars ?? '4'},${extra.at ?? '2026-05-01'},${extra.yes ?? '0'},${extra.no ?? '0'},rv-000001,${extra.score ?? ''},true,fine`;

describe('review CSV: delimiters, BOM and line numbers', () => {
  it.each([
    [',', 'comma'],
    [';', 'semicolon'],
    ['\t', 'tab'],
  ] as const)('reads a file delimited by %j (%s)', async (delimiter, _name) => {
    const text = [header, good('r1'), good('r2', { stars: '5' })]
      .map((l) => l.split(',').join(delimiter))
      .join('\r\n');
    const result = await collectImport(source(text), 'reviews', { now });
    expect(result.summary.delimiter).toBe(delimiter);
    expect(result.rows.map((r) => [r.line, r.row.reviewId, r.row.stars])).toEqual([
      [2, 'r1', 4],
      [3, 'r2', 5],
    ]);
    expect(result.errors).toEqual([]);
  });

  it('drops a UTF-8 byte order mark and matches headers case-insensitively with spaces around', async () => {
    const head = header
      .split(',')
      .map((h) => ` ${h.toUpperCase()} `)
      .join(',');
    const bytes = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(`${head}\n${good('r1')}\n`)]);
    const result = await collectImport(source(bytes, 2), 'reviews', { now });
    expect(result.summary.header[0]).toEqual({ position: 1, header: ' REVIEW_ID ', column: 'review_id' });
    expect(result.rows).toHaveLength(1);
  });

  it('counts physical lines when quoted fields hold line breaks', async () => {
    const result = await reviews([
      good('r1').replace(',fine', ',"two\nlines"'),
      good('r2', { stars: '9' }),
      good('r3').replace(',fine', ',"three\r\nphysical\nlines"'),
      '',
      good('r4', { stars: '0' }),
    ]);
    expect(result.rows.map((r) => r.line)).toEqual([2, 5]);
    expect(result.rows[0]?.row.text).toBe('two\nlines');
    expect(result.errors.map((e) => e.line)).toEqual([4, 9]);
    expect(result.summary.blankLines).toBe(1);
  });

  it('prefers the delimiter that splits the header most, ignoring quoted ones', () => {
    expect(sniffDelimiter('"a,b,c";d;e')).toBe(';');
    expect(sniffDelimiter('a\tb\tc')).toBe('\t');
    expect(sniffDelimiter('single')).toBe(',');
  });
});

describe('review CSV: row rules', () => {
  it.each([
    ['0', /^stars must be a whole number from 1 to 5 \(got "0"\)$/],
    ['6', /^stars must be a whole number from 1 to 5 \(got "6"\)$/],
    ['five', /^stars must be a whole number from 1 to 5 \(got "five"\)$/],
    ['4.5', /^stars must be a whole number from 1 to 5 \(got "4.5"\)$/],
    ['', /^stars is missing$/],
  ])('rejects stars %j', async (stars, reason) => {
    const result = await reviews([good('r1', { stars })]);
    expect(result.errors).toHaveLength(1);
    expect(result.errors[0]).toMatchObject({ line: 2, column: 'stars' });
    expect(result.errors[0]?.reason).toMatch(reason);
  });

  it.each([
    ['2026-12-03', /reviewed_at is in the future/],
    ['2026-12-01T23:00:00-05:00', /reviewed_at is in the future/],
    ['2026-02-30', /reviewed_at is not a date/],
    ['03/04/2026', /reviewed_at is not a date/],
    ['yesterday', /reviewed_at is not a date/],
    ['1900-01-01', /before 1995/],
  ])('rejects reviewed_at %j', async (at, reason) => {
    const result = await reviews([good('r1', { at })]);
    expect(result.errors[0]?.column).toBe('reviewed_at');
    expect(result.errors[0]?.reason).toMatch(reason);
  });

  it('accepts the date forms Ballast documents and reads offsets', async () => {
    const forms = [
      '2026-05-01',
      '2026-05-01T10:20Z',
      '2026-05-01 10:20:30',
      '2026-05-01T10:20:30.5+02:00',
      '2026-12-02',
    ];
    const result = await reviews(forms.map((at, i) => good(`r${i}`, { at })));
    expect(result.errors).toEqual([]);
    expect(result.rows.map((r) => r.row.reviewedAt.toISOString())).toEqual([
      '2026-05-01T00:00:00.000Z',
      '2026-05-01T10:20:00.000Z',
      '2026-05-01T10:20:30.000Z',
      '2026-05-01T08:20:30.500Z',
      '2026-12-02T00:00:00.000Z',
    ]);
  });

  it.each([
    ['-1', 'yes'],
    ['2.5', 'no'],
    ['many', 'yes'],
  ] as const)('rejects helpful count %j', async (value, which) => {
    const result = await reviews([good('r1', { [which]: value })]);
    expect(result.errors[0]?.column).toBe(which === 'yes' ? 'helpful_yes' : 'helpful_no');
    expect(result.errors[0]?.reason).toMatch(/whole number, 0 or more/);
  });

  it('defaults blank helpful counts to 0 and reads optional fields', async () => {
    const result = await reviews(['r1,KB-1,Kettle,kettles,3,2026-01-01,,,,,,']);
    expect(result.rows[0]?.row).toMatchObject({
      category: 'kettles',
      helpfulYes: 0,
      helpfulNo: 0,
      reviewerId: null,
      reviewerScore: null,
      verified: null,
      text: null,
    });
  });

  it.each(['1.2', '-0.1', 'high'])('rejects reviewer_score %j', async (score) => {
    const result = await reviews([good('r1', { score })]);
    expect(result.errors[0]?.column).toBe('reviewer_score');
  });

  it.each([
    ['yes', true],
    ['NO', false],
    ['1', true],
    ['false', false],
  ] as const)('reads verified %j', async (word, value) => {
    const result = await reviews([good('r1').replace(',true,', `,${word},`)]);
    expect(result.rows[0]?.row.verified).toBe(value);
  });

  it.each(['maybe', 'constructor', 'toString'])('rejects verified %j', async (word) => {
    const result = await reviews([good('r1').replace(',true,', `,${word},`)]);
    expect(result.rows).toEqual([]);
    expect(result.errors[0]).toMatchObject({ line: 2, column: 'verified' });
  });

  it('rejects a missing sku and names the column', async () => {
    const result = await reviews([good('r1', { sku: '' })]);
    expect(result.errors[0]).toMatchObject({ line: 2, column: 'sku', reason: 'sku is missing' });
  });

  it('rejects the second occurrence of a review_id and names the first line', async () => {
    const result = await reviews([good('r1'), good('r2'), good('r1', { stars: '2' })]);
    expect(result.rows.map((r) => r.line)).toEqual([2, 3]);
    expect(result.errors).toEqual([
      expect.objectContaining({
        line: 4,
        column: 'review_id',
        reason: 'review_id already appeared on line 2',
      }),
    ]);
  });

  it('reports a row with the wrong number of fields', async () => {
    const result = await reviews([good('r1') + ',surplus', 'r2,KB-1,Kettle']);
    expect(result.errors.map((e) => [e.line, e.reason])).toEqual([
      [2, 'expected 12 fields as in the header, found 13; check for an unquoted comma inside a value'],
      [3, 'expected 12 fields as in the header, found 3; check for an unquoted comma inside a value'],
    ]);
  });

  it('needs a title on the first row of a sku and lets later rows inherit it', async () => {
    const result = await reviews([
      'r1,KB-2,,kettles,4,2026-01-01,0,0,,,,',
      'r2,KB-1,Keelwood Kettle,kettles,4,2026-01-01,0,0,,,,',
      'r3,KB-1,,kettles,5,2026-01-02,0,0,,,,',
    ]);
    expect(result.errors).toEqual([expect.objectContaining({ line: 2, column: 'title' })]);
    expect(result.rows.map((r) => r.row.title)).toEqual(['Keelwood Kettle', 'Keelwood Kettle']);
  });

  it('rejects a title over 500 characters and cuts a text over 20,000', async () => {
    const result = await reviews([
      good('r1').replace('Keelwood Kettle', 'T'.repeat(501)),
      good('r2', { sku: 'KB-9' }).replace(',fine', `,${'x'.repeat(25_000)}`),
    ]);
    expect(result.errors[0]?.reason).toMatch(/title is longer than 500/);
    expect(result.rows[0]?.row.text).toHaveLength(20_000);
    expect(result.summary.textsTruncated).toBe(1);
  });

  it('keeps formula-like cells exactly as written', async () => {
    const cells = ['=HYPERLINK("http://example.invalid")', '+1 great', '-meh', '@home', '\tindented'];
    const result = await reviews(
      cells.map((text, i) => good(`r${i}`).replace(',fine', `,"${text.replace(/"/g, '""')}"`)),
    );
    expect(result.rows.map((r) => r.row.text)).toEqual(cells);
  });

  it('joins several problems of one row into one reason', async () => {
    const result = await reviews([good('r1', { stars: '7', yes: '-3' })]);
    expect(result.summary).toMatchObject({ rowsRead: 1, rowsValid: 0, rowsInvalid: 1 });
    expect(result.errors[0]?.reason).toMatch(/stars .*; helpful_yes/);
    expect(result.errors[0]?.raw).toBe(good('r1', { stars: '7', yes: '-3' }));
  });
});

describe('review CSV: whole-file rules', () => {
  it.each([
    ['0 bytes', ''],
    ['whitespace only', '  \n\t\r\n  '],
    ['a BOM only', '\ufeff'],
  ])('refuses an empty file (%s)', async (_label, content) => {
    expect((await fileError(content)).code).toBe('empty_file');
  });

  it('accepts a header without rows as a valid file with 0 rows and a warning', async () => {
    const result = await collectImport(source(header + '\n'), 'reviews', { now });
    expect(result.summary).toMatchObject({ rowsRead: 0, rowsValid: 0, rowsInvalid: 0 });
    expect(result.summary.warnings.join(' ')).toMatch(/header but no rows/);
  });

  it.each([
    ['an xlsx (zip)', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 8, 0]), /Excel workbook/],
    ['a PDF', Buffer.from('%PDF-1.7\n%\u00e2\u00e3\n1 0 obj'), /PDF/],
    ['a gzip', Buffer.from([0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 3]), /gzip/],
  ])('refuses a binary file (%s)', async (_label, content, message) => {
    const error = await fileError(content);
    expect(error.code).toBe('binary_file');
    expect(error.message).toMatch(message);
  });

  it('refuses Latin-1 bytes and says to save as UTF-8', async () => {
    const latin1 = Buffer.from(
      `${header}\n${good('r1')}\n${good('r2').replace('fine', 'tr\u00e8s bien')}\n`,
      'latin1',
    );
    const error = await fileError(latin1);
    expect(error.code).toBe('not_utf8');
    expect(error.message).toMatch(/UTF-8/);
    expect(error.message).toMatch(/line 3/);
  });

  it('refuses a file over the size limit', async () => {
    const text = [header, ...Array.from({ length: 50 }, (_, i) => good(`r${i}`))].join('\n');
    const error = await fileError(text, 'reviews', 1000);
    expect(error.code).toBe('too_large');
  });

  it('refuses a header missing a required column, naming it', async () => {
    const error = await fileError(header.replace('stars,', '') + '\n');
    expect(error.code).toBe('missing_column');
    expect(error.message).toMatch(/stars/);
  });

  it('refuses an unknown column, naming it and its position', async () => {
    const error = await fileError(header + ',colour\n');
    expect(error.code).toBe('unknown_column');
    expect(error.message).toMatch(/Unknown column "colour" \(column 13\)/);
  });

  it('points out an aggregate column in a review file', async () => {
    const error = await fileError(header.replace('reviewed_at', 'observed_on') + '\n');
    expect(error.message).toMatch(/aggregates format/);
  });

  it('refuses a column named twice', async () => {
    expect((await fileError(header + ',SKU\n')).code).toBe('duplicate_column');
  });

  it('ignores unnamed trailing columns left by a spreadsheet, but not values in them', async () => {
    const result = await collectImport(
      source(`${header},,\n${good('r1')},,\n${good('r2')},,oops\n`),
      'reviews',
      { now },
    );
    expect(result.rows).toHaveLength(1);
    expect(result.errors[0]?.reason).toMatch(/column 14 has no header/);
    expect(result.summary.warnings.join(' ')).toMatch(/2 unnamed column/);
  });

  it('refuses a file whose quoted field never closes, naming the line', async () => {
    const error = await fileError(
      `${header}\n${good('r1')}\n${good('r2').replace(',fine', ',"never closed')}\n${good('r3')}\n`,
    );
    expect(error.code).toBe('malformed_csv');
    expect(error.line).toBe(3);
  });
});

describe('aggregate CSV', () => {
  const head =
    'sku,title,category,observed_on,review_count,mean_stars,stars_1,stars_2,stars_3,stars_4,stars_5,newest_review_at';
  const aggregates = (lines: string[], h = head) =>
    collectImport(source([h, ...lines].join('\n')), 'aggregates', { now });

  it('reads rows with and without star counts', async () => {
    const result = await aggregates([
      'DL-1,Lamp,desk-lighting,2026-10-05,5,4.8,0,0,0,1,4,2026-10-01T10:00:00Z',
      'DL-1,,desk-lighting,2026-10-12,6,4.7,,,,,,',
      'DL-2,Clamp,desk-lighting,2026-10-12,0,,,,,,,',
    ]);
    expect(result.errors).toEqual([]);
    expect(result.rows.map((r) => r.row)).toEqual([
      {
        sku: 'DL-1',
        title: 'Lamp',
        category: 'desk-lighting',
        observedOn: '2026-10-05',
        reviewCount: 5,
        meanStars: 4.8,
        histogram: [0, 0, 0, 1, 4],
        newestReviewAt: new Date('2026-10-01T10:00:00Z'),
      },
      expect.objectContaining({
        title: 'Lamp',
        reviewCount: 6,
        meanStars: 4.7,
        histogram: null,
        newestReviewAt: null,
      }),
      expect.objectContaining({ reviewCount: 0, meanStars: null }),
    ]);
  });

  it.each([
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,5.5,,,,,,', /mean_stars must be a number from 1 to 5/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,0.5,,,,,,', /mean_stars must be a number from 1 to 5/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,,,,,,,', /mean_stars is required/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,0,4,,,,,,', /mean_stars must be empty/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,4.8,0,0,0,1,3,', /add up to 4, but review_count is 5/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,4.2,0,0,0,1,4,', /disagrees with the star counts/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,4.8,0,0,,1,4,', /all filled or all empty/],
    ['DL-1,Lamp,desk-lighting,2026-10-05,-1,,,,,,,', /review_count must be a whole number/],
    ['DL-1,Lamp,desk-lighting,2027-01-05,5,4.8,,,,,,', /observed_on is in the future/],
    [
      'DL-1,Lamp,desk-lighting,2026-10-05T10:00,5,4.8,,,,,,',
      /observed_on is not a date in the form YYYY-MM-DD/,
    ],
    ['DL-1,Lamp,desk-lighting,2026-10-05,5,4.8,,,,,,2026-10-09', /newest_review_at is after observed_on/],
  ])('rejects %j', async (line, reason) => {
    const result = await aggregates([line]);
    expect(result.errors).toHaveLength(1);
    expect(result.errors[0]?.reason).toMatch(reason);
  });

  it('accepts a mean that agrees with the star counts within its written rounding', async () => {
    const result = await aggregates([
      'DL-1,Lamp,desk-lighting,2026-10-05,3,4.7,0,0,0,1,2,',
      'DL-1,Lamp,desk-lighting,2026-10-06,3,5,0,0,0,1,2,',
      'DL-1,Lamp,desk-lighting,2026-10-07,3,4.67,0,0,0,1,2,',
      'DL-1,Lamp,desk-lighting,2026-10-08,3,4.6,0,0,0,1,2,',
    ]);
    expect(result.rows.map((r) => r.line)).toEqual([2, 3, 4]);
    expect(result.errors.map((e) => e.line)).toEqual([5]);
  });

  it('rejects a second observation of the same item on the same day', async () => {
    const result = await aggregates([
      'DL-1,Lamp,desk-lighting,2026-10-05,5,4.8,,,,,,',
      'DL-1,Lamp,desk-lighting,2026-10-05,6,4.8,,,,,,',
    ]);
    expect(result.errors[0]?.reason).toMatch(/already has an observation .* line 2/);
  });

  it('refuses a header with only some of the star-count columns', async () => {
    const error = await fileError(head.replace(',stars_3', '') + '\n', 'aggregates');
    expect(error.code).toBe('missing_column');
    expect(error.message).toMatch(/stars_3/);
  });
});

describe('streaming', () => {
  it('yields the first row before the source has ended and keeps memory bounded over 200,000 rows', async () => {
    const total = 200_000;
    let produced = 0;
    function* lines() {
      yield header + '\n';
      while (produced < total) {
        const batch: string[] = [];
        for (let i = 0; i < 1000 && produced < total; i++, produced++)
          batch.push(good(`r${produced}`, { stars: String((produced % 5) + 1) }));
        yield batch.join('\n') + '\n';
      }
    }
    const run = parseImport(Readable.from(lines()), 'reviews', { now, maxBytes: 1e9 });
    let producedAtFirstRow = -1;
    let count = 0;
    global.gc?.();
    const before = process.memoryUsage().heapUsed;
    let peak = before;
    for await (const record of run) {
      if (count === 0) producedAtFirstRow = produced;
      count++;
      if (count % 20_000 === 0) peak = Math.max(peak, process.memoryUsage().heapUsed);
      expect('row' in record).toBe(true);
    }
    expect(count).toBe(total);
    expect(run.summary).toMatchObject({ rowsRead: total, rowsValid: total });
    expect(producedAtFirstRow).toBeGreaterThan(0);
    expect(producedAtFirstRow).toBeLessThan(total / 10);
    // The file is ~20 MB of text; only the review-id index (~200,000 short strings) should be held.
    expect(peak - before).toBeLessThan(120 * 1024 * 1024);
  }, 60_000);

  it('closes the source when the reader stops early', async () => {
    const lines = [header, ...Array.from({ length: 5000 }, (_, i) => good(`r${i}`))].join('\n');
    const input = source(lines, 4096);
    for await (const record of parseImport(input, 'reviews', { now })) {
      expect(record.line).toBe(2);
      break;
    }
    expect(input.destroyed).toBe(true);
  });

  it('can be read only once, and has a summary only after reading', async () => {
    const run = parseImport(source(`${header}\n${good('r1')}\n`), 'reviews', { now });
    expect(() => run.summary).toThrow();
    for await (const _ of run) void _;
    expect(run.summary.rowsValid).toBe(1);
    expect(() => run[Symbol.asyncIterator]()).toThrow();
  });
});

describe('files people really have (issue 13)', () => {
  it('reads LF, CRLF and a bare CR in one file, naming a bad row by its own line', async () => {
    const text = `${header}\r\n${good('r1')}\r\n${good('r2')}\r${good('r3')}\n${good('r4', { stars: '6' })}\r\n${good('r5')}\n`;
    // Chunks of 1 byte put every CR at a chunk's end, where CRLF and a bare CR look alike.
    for (const chunk of [1, 7]) {
      const result = await collectImport(source(text, chunk), 'reviews', { now });
      expect(result.rows.map((r) => [r.line, r.row.reviewId])).toEqual([
        [2, 'r1'],
        [3, 'r2'],
        [4, 'r3'],
        [6, 'r5'],
      ]);
      expect(result.errors.map((e) => e.line)).toEqual([5]);
    }
  });

  it('reads a CR-only file, also with a line break inside a quoted text', async () => {
    const text = [header, good('r1').replace(',fine', ',"two\rlines"'), good('r2')].join('\r');
    const result = await collectImport(source(text), 'reviews', { now });
    expect(result.rows.map((r) => [r.line, r.row.reviewId, r.row.text])).toEqual([
      [2, 'r1', 'two\nlines'],
      [4, 'r2', 'fine'],
    ]);
  });

  it.each([
    [
      'UTF-16 LE with BOM',
      Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(`${header}\n${good('r1')}\n`, 'utf16le')]),
    ],
    [
      'UTF-16 BE with BOM',
      Buffer.concat([
        Buffer.from([0xfe, 0xff]),
        Buffer.from(`${header}\n${good('r1')}\n`, 'utf16le').swap16(),
      ]),
    ],
    ['UTF-16 LE without BOM', Buffer.from(`${header}\n${good('r1')}\n`, 'utf16le')],
    ['UTF-16 BE without BOM', Buffer.from(`${header}\n${good('r1')}\n`, 'utf16le').swap16()],
  ])('decodes %s', async (_label, bytes) => {
    const result = await collectImport(source(bytes), 'reviews', { now });
    expect(result.errors).toEqual([]);
    expect(result.rows.map((r) => r.row.reviewId)).toEqual(['r1']);
  });

  it('refuses UTF-16 holding half an emoji, saying it is not valid UTF-16', async () => {
    const bytes = Buffer.concat([
      Buffer.from([0xff, 0xfe]),
      Buffer.from(`${header}\n${good('r1')}\n`, 'utf16le'),
      Buffer.from([0x3d, 0xd8]),
      Buffer.from('x\n', 'utf16le'),
    ]);
    const error = await fileError(bytes);
    expect(error.code).toBe('not_utf8');
    expect(error.message).toMatch(/not valid UTF-16 \(little-endian\) on or after line 3/);
  });

  it('takes rows padded with empty fields, but not an extra field that holds a value', async () => {
    const result = await reviews([`${good('r1')},,,`, `${good('r2')},`, `${good('r3')},,x`]);
    expect(result.rows.map((r) => r.row.reviewId)).toEqual(['r1', 'r2']);
    expect(result.errors.map((e) => [e.line, e.reason])).toEqual([
      [4, 'expected 12 fields as in the header, found 14; check for an unquoted comma inside a value'],
    ]);
  });

  it('matches header names whatever their case, spaces or invisible characters, and names what it ignored', async () => {
    const head = header
      .replace('review_id', ' Review_ID ')
      .replace('sku', 'SKU\u200b')
      .replace('title', '\u2060title');
    const result = await reviews([good('r1')], head);
    expect(result.rows).toHaveLength(1);
    expect(result.summary.warnings).toEqual([
      'Column 2 is "sku" with the invisible character U+200B; it was read as sku.',
      'Column 3 is "title" with the invisible character U+2060; it was read as title.',
    ]);
  });

  it('names an invisible character in an unknown column', async () => {
    const error = await fileError(`${header.replace('stars', 'star\u200bz')}\n${good('r1')}\n`);
    expect(error.code).toBe('unknown_column');
    expect(error.message).toMatch(
      /^Unknown column "starz" \(column 5, which also holds the invisible character U\+200B\)/,
    );
  });

  it('cuts a text over 20,000 characters (as the README says) instead of refusing the file', async () => {
    for (const [unit, count] of [
      ['a', 1_050_000],
      ['\u{1F375}', 20_005],
      ['e\u0301', 20_001],
    ] as const) {
      const result = await reviews([good('r1').replace(',fine', `,${unit.repeat(count)}`)]);
      const text = result.rows[0]!.row.text!;
      // Each unit is one grapheme cluster (UAX #29: an emoji; a letter with its combining accent).
      expect(text).toBe(unit.repeat(20_000));
      expect(result.summary.textsTruncated).toBe(1);
    }
  });

  it('counts a title in characters as a person sees them: 300 emoji are 300 characters', async () => {
    const title = '\u{1F375}'.repeat(300);
    const result = await reviews([good('r1').replace('Keelwood Kettle', title)]);
    expect(result.errors).toEqual([]);
    expect(result.rows[0]!.row.title).toBe(title);
  });

  it('rejects a NUL in a cell with the reason the ingest API gives, and quotes the row without it', async () => {
    const result = await reviews([good('r1').replace(',fine', ',fi\u0000ne'), good('r2')]);
    expect(result.rows.map((r) => r.row.reviewId)).toEqual(['r2']);
    expect(result.errors).toEqual([
      {
        line: 2,
        column: 'text',
        reason: nulReason('text'),
        raw: good('r1').replace(',fine', ',fi\u2400ne'),
      },
    ]);
  });

  it('names a bad row that spans lines by its first line', async () => {
    const result = await reviews([
      good('r1').replace(',fine', ',"one\ntwo\nthree"'),
      good('r2', { stars: '9' }).replace(',fine', ',"four\r\nfive"'),
      good('r3'),
    ]);
    expect(result.errors.map((e) => e.line)).toEqual([5]);
    expect(result.rows.map((r) => r.line)).toEqual([2, 7]);
  });

  it.each([
    ['a 200 KB line with no line break', 'x'.repeat(200_000)],
    ['a header of 100,000 columns', Array.from({ length: 100_000 }, (_, i) => `c${i}`).join(',') + '\n'],
  ])('refuses %s, quoting only a short excerpt', async (_label, text) => {
    const error = await fileError(Buffer.from(text), 'reviews');
    expect(error.code).toBe('malformed_csv');
    expect(error.line).toBe(1);
    expect(error.message.length).toBeLessThan(300);
  });

  it('quotes at most 200 characters of a rejected row', async () => {
    const result = await reviews([good('r1'), 'y'.repeat(200_000), good('r2')]);
    expect(result.errors).toHaveLength(1);
    expect(result.errors[0]!.line).toBe(3);
    expect(result.errors[0]!.raw).toBe('y'.repeat(200) + '…');
  });
});

describe('grapheme counting', () => {
  it('agrees with Intl.Segmenter over the whole text, for texts read in short windows', () => {
    // Reference: Intl.Segmenter (ECMA-402) segmenting the whole string at once.
    const segmenter = new Intl.Segmenter(undefined, { granularity: 'grapheme' });
    for (const unit of [
      'ab\u{1F468}\u200d\u{1F469}\u200d\u{1F467}',
      'e\u0301',
      '\r\n',
      '\u{1F1F3}\u{1F1FF}x',
      'z\u0334\u0321\u031b\u034e\u0317',
    ]) {
      const text = unit.repeat(997);
      const all = [...segmenter.segment(text)].map((s) => s.segment);
      expect(graphemeLength(text)).toBe(all.length);
      expect(cutGraphemes(text, 700)).toBe(all.slice(0, 700).join(''));
    }
  });
});
