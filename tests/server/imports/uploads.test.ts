import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { ImportBatchRecord, ImportPreview } from '../../../shared/schemas/imports-api.schema';
import { rootDir } from '../../../server/config/env';
import { chunkRows } from '../../../server/modules/imports/imports.writer';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

const sample = (name: string) => path.join(rootDir, 'templates', 'imports', name);

let t: TestApp;
let ops: Agent;
let manager: Agent;

beforeAll(async () => {
  t = await setupTestApp();
  ops = await t.signIn('ops');
  manager = await t.signIn('manager');
});
afterAll(async () => t.close());

async function count(sql: string, replacements: unknown[] = []): Promise<number> {
  const [rows] = (await t.db.sequelize.query(sql, { replacements })) as [{ n: number }[], unknown];
  return Number(rows[0]!.n);
}

async function upload(
  agent: Agent,
  file: string | Buffer,
  fields: { kind?: string; mode?: string },
  name = 'upload.csv',
) {
  const req = agent.post('/api/imports').set('x-csrf-token', agent.csrf);
  if (fields.kind) void req.field('kind', fields.kind);
  if (fields.mode) void req.field('mode', fields.mode);
  return typeof file === 'string' ? req.attach('file', file) : req.attach('file', file, name);
}

async function finished(agent: Agent, id: number): Promise<ImportBatchRecord> {
  for (let i = 0; i < 300; i++) {
    const res = await agent.get(`/api/imports/${id}`).expect(200);
    const batch = res.body as ImportBatchRecord;
    if (batch.status !== 'queued' && batch.status !== 'running') return batch;
    await sleep(100);
  }
  throw new Error(`import ${id} did not finish`);
}

async function importFile(agent: Agent, file: string | Buffer, kind: string, mode: string, name?: string) {
  const res = await upload(agent, file, { kind, mode }, name);
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  return finished(agent, (res.body as ImportBatchRecord).id);
}

const mistakes = sample('reviews.with-mistakes.sample.csv');
const expectedErrors = [
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
];

function errorsCsv(text: string): Record<string, string>[] {
  return parse(text.replace(/^\uFEFF/, ''), { columns: true }) as Record<string, string>[];
}

describe('POST /api/imports/preview', () => {
  it('shows the first rows as Ballast reads them, with the mapped columns and each row error, writing nothing', async () => {
    const before = await count('SELECT COUNT(*) AS n FROM reviews');
    const res = await ops
      .post('/api/imports/preview')
      .set('x-csrf-token', ops.csrf)
      .field('kind', 'reviews')
      .attach('file', mistakes)
      .expect(200);
    const preview = res.body as ImportPreview;
    expect(preview.delimiter).toBe('comma');
    expect(preview.fileError).toBeNull();
    expect(preview.header.map((h) => h.column)).toEqual([
      'review_id',
      'sku',
      'title',
      'category',
      'stars',
      'reviewed_at',
      'helpful_yes',
      'helpful_no',
      'reviewer_id',
      'reviewer_score',
      'verified',
      'text',
    ]);
    expect(preview.rows).toHaveLength(13);
    expect(preview.rows.filter((r) => r.error).map((r) => r.line)).toEqual([4, 6, 7, 8, 9, 10, 11]);
    const second = preview.rows.find((r) => r.line === 3)!;
    expect(second.values).toMatchObject({ title: 'Wendrigg Pruning Shears Pro', stars: '5' });
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before);
  });

  it('reads a semicolon file and names the delimiter', async () => {
    const csv =
      'review_id;sku;title;category;stars;reviewed_at\nsc-1;GT-9001;Semi Tool;garden-tools;4;2026-05-01\n';
    const res = await ops
      .post('/api/imports/preview')
      .set('x-csrf-token', ops.csrf)
      .field('kind', 'reviews')
      .attach('file', Buffer.from(csv), 'semi.csv')
      .expect(200);
    expect((res.body as ImportPreview).delimiter).toBe('semicolon');
    expect((res.body as ImportPreview).rows[0]!.values).toMatchObject({ sku: 'GT-9001' });
  });

  it('gives the parser’s clear message for an empty, a binary and a non-UTF-8 file', async () => {
    const cases: [Buffer, string][] = [
      [Buffer.alloc(0), 'The file is empty'],
      [Buffer.from([0x50, 0x4b, 0x03, 0x04, 1, 2, 3, 4, 5, 6]), 'zip archive or an Excel workbook'],
      [Buffer.from('review_id,sku\nr1,caf\xe9\n', 'latin1'), 'not valid UTF-8'],
    ];
    for (const [body, message] of cases) {
      const preview = await ops
        .post('/api/imports/preview')
        .set('x-csrf-token', ops.csrf)
        .field('kind', 'reviews')
        .attach('file', body, 'bad.csv')
        .expect(200);
      expect((preview.body as ImportPreview).fileError?.message).toContain(message);
      const start = await upload(ops, body, { kind: 'reviews', mode: 'valid_rows' }, 'bad.csv');
      expect(start.status).toBe(400);
      expect((start.body as { error: { message: string } }).error.message).toContain(message);
    }
  });

  it('asks for a file when there is none', async () => {
    const res = await ops
      .post('/api/imports')
      .set('x-csrf-token', ops.csrf)
      .field('kind', 'reviews')
      .expect(400);
    expect(res.body.error.message).toContain('Choose a file');
  });
});

describe('POST /api/imports', () => {
  it('imports the valid rows of the file with mistakes: 13 read, 6 accepted, 7 rejected with line and reason', async () => {
    const batch = await importFile(ops, mistakes, 'reviews', 'valid_rows');
    expect(batch).toMatchObject({
      status: 'succeeded',
      rowsRead: 13,
      rowsAccepted: 6,
      rowsRejected: 7,
      rowsInserted: 6,
      rowsUpdated: 0,
      fileName: 'reviews.with-mistakes.sample.csv',
      who: 'Otto Brambleby',
    });
    expect(batch.bytesDone).toBe(batch.fileBytes);
    const csv = await ops.get(`/api/imports/${batch.id}/errors.csv`).expect(200);
    expect(csv.headers['content-type']).toContain('text/csv');
    const rows = errorsCsv(csv.text);
    expect(rows.map(({ line, column, reason }) => ({ line: Number(line), column, reason }))).toEqual(
      expectedErrors,
    );
    expect(rows[0]!.raw).toBe(
      'vbm-m-0003,GT-5008,,garden-tools,6,2026-06-16,0,0,rv-000087,,true,Ten out of ten.',
    );
    const stored = await count(
      "SELECT COUNT(*) AS n FROM reviews r JOIN items i ON i.id = r.item_id WHERE r.external_id LIKE 'vbm-m-%'",
    );
    expect(stored).toBe(6);
    const formula = await t.db.sequelize.query("SELECT body FROM reviews WHERE external_id = 'vbm-m-0010'", {
      plain: true,
    });
    expect((formula as { body: string }).body).toBe('=HYPERLINK("http://example.invalid","see photos")');
  });

  it('counts one mistake in the singular when all-or-nothing refuses a file', async () => {
    const [header, good] = (await readFile(mistakes, 'utf8')).split('\n');
    const bad = good!.replace('vbm-m-0001', 'one-m-0002').replace(',4,2026-06-02,', ',6,2026-06-02,');
    const csv = [header, good!.replace('vbm-m-0001', 'one-m-0001'), bad].join('\n') + '\n';
    const batch = await importFile(ops, Buffer.from(csv), 'reviews', 'all_or_nothing', 'one.csv');
    expect(batch).toMatchObject({ status: 'rejected', rowsRead: 2, rowsRejected: 1 });
    expect(batch.errorMessage).toBe('1 of 2 rows has a mistake, so nothing was imported (all or nothing).');
  });

  it('writes nothing in all-or-nothing mode and keeps every error', async () => {
    const before = await count('SELECT COUNT(*) AS n FROM reviews');
    const itemsBefore = await count('SELECT COUNT(*) AS n FROM items');
    const csv = (await readFile(mistakes, 'utf8')).replace(/vbm-m-/g, 'aon-m-').replace(/GT-/g, 'AON-');
    const batch = await importFile(ops, Buffer.from(csv), 'reviews', 'all_or_nothing', 'aon.csv');
    expect(batch).toMatchObject({ status: 'rejected', rowsRead: 13, rowsAccepted: 0, rowsRejected: 7 });
    expect(batch.errorMessage).toBe('7 of 13 rows have mistakes, so nothing was imported (all or nothing).');
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before);
    expect(await count('SELECT COUNT(*) AS n FROM items')).toBe(itemsBefore);
    const rows = errorsCsv((await ops.get(`/api/imports/${batch.id}/errors.csv`).expect(200)).text);
    expect(rows.map((r) => Number(r.line))).toEqual([4, 6, 7, 8, 9, 10, 11]);
  });

  it('imports every sample from templates/ in all-or-nothing mode', async () => {
    const reviews = await importFile(ops, sample('reviews.sample.csv'), 'reviews', 'all_or_nothing');
    expect(reviews).toMatchObject({ status: 'succeeded', rowsRead: 20, rowsAccepted: 20, rowsRejected: 0 });
    const aggregates = await importFile(ops, sample('aggregates.sample.csv'), 'aggregates', 'all_or_nothing');
    expect(aggregates).toMatchObject({
      status: 'succeeded',
      rowsRead: 10,
      rowsAccepted: 10,
      rowsRejected: 0,
    });
    expect(aggregates.rowsInserted).toBe(10);
    const histogram = await t.db.sequelize.query(
      "SELECT a.stars_5 AS s5, a.mean_stars AS mean FROM aggregate_observations a JOIN items i ON i.id = a.item_id WHERE i.sku = 'DL-3012' AND a.observed_on = '2026-10-05'",
      { plain: true },
    );
    expect(histogram).toMatchObject({ s5: 86 });
    expect(Number((histogram as { mean: string }).mean)).toBeCloseTo(4.46, 5);
  });

  it('changes nothing when the same file comes twice, and updates a changed helpful count', async () => {
    const csv = (await readFile(sample('reviews.sample.csv'), 'utf8')).replace(/vbm-s-/g, 'idem-');
    const first = await importFile(ops, Buffer.from(csv), 'reviews', 'valid_rows', 'idem.csv');
    expect(first).toMatchObject({ status: 'succeeded', rowsInserted: 20, rowsUpdated: 0 });
    const total = await count('SELECT COUNT(*) AS n FROM reviews');
    const stamp = await count(
      "SELECT UNIX_TIMESTAMP(MAX(updated_at)) AS n FROM reviews WHERE external_id LIKE 'idem-%'",
    );
    // updated_at has whole-second precision: wait until the database clock has moved past the stamp, so
    // that a touched row would show a later one.
    await expect
      .poll(() => count('SELECT UNIX_TIMESTAMP() AS n'), { timeout: 10_000 })
      .toBeGreaterThan(stamp);
    const again = await importFile(ops, Buffer.from(csv), 'reviews', 'valid_rows', 'idem.csv');
    expect(again).toMatchObject({ status: 'succeeded', rowsAccepted: 20, rowsInserted: 0, rowsUpdated: 0 });
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(total);
    expect(
      await count("SELECT UNIX_TIMESTAMP(MAX(updated_at)) AS n FROM reviews WHERE external_id LIKE 'idem-%'"),
    ).toBe(stamp);

    const lines = csv.split('\n');
    const cells = lines[1]!.split(',');
    cells[6] = String(Number(cells[6]) + 5);
    lines[1] = cells.join(',');
    const changed = await importFile(ops, Buffer.from(lines.join('\n')), 'reviews', 'valid_rows', 'idem.csv');
    expect(changed).toMatchObject({ rowsInserted: 0, rowsUpdated: 1 });
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(total);
    expect(await count('SELECT helpful_yes AS n FROM reviews WHERE external_id = ?', [cells[0]])).toBe(
      Number(cells[6]),
    );
  });

  it('rejects a row for an unknown category and keeps the rest', async () => {
    const csv =
      'review_id,sku,title,category,stars,reviewed_at\n' +
      'unk-1,GT-7001,Known Tool,garden-tools,4,2026-05-01\n' +
      'unk-2,ZZ-1,Mystery,no-such-category,4,2026-05-01\n';
    const batch = await importFile(ops, Buffer.from(csv), 'reviews', 'valid_rows', 'unknown.csv');
    expect(batch).toMatchObject({ rowsAccepted: 1, rowsRejected: 1 });
    const rows = errorsCsv((await ops.get(`/api/imports/${batch.id}/errors.csv`).expect(200)).text);
    expect(rows).toEqual([
      {
        line: '3',
        column: 'category',
        reason: 'unknown category: no-such-category',
        raw: 'unk-2,ZZ-1,no-such-category',
      },
    ]);
  });

  it('lets a category manager write only into the categories they own', async () => {
    const csv =
      'review_id,sku,title,category,stars,reviewed_at\n' +
      'mgr-1,KB-8001,Owned Kettle,kettles-and-brewers,5,2026-05-01\n' +
      'mgr-2,DL-8001,Foreign Lamp,desk-lighting,5,2026-05-01\n';
    const batch = await importFile(manager, Buffer.from(csv), 'reviews', 'valid_rows', 'manager.csv');
    expect(batch).toMatchObject({ rowsAccepted: 1, rowsRejected: 1, who: 'Mira Fenwhistle' });
    const rows = errorsCsv((await manager.get(`/api/imports/${batch.id}/errors.csv`).expect(200)).text);
    expect(rows[0]).toMatchObject({ line: '3', reason: 'not one of your categories: desk-lighting' });
    expect(await count("SELECT COUNT(*) AS n FROM reviews WHERE external_id IN ('mgr-1','mgr-2')")).toBe(1);

    const history = await manager.get('/api/imports').expect(200);
    expect((history.body as ImportBatchRecord[]).every((b) => b.who === 'Mira Fenwhistle')).toBe(true);
    const opsHistory = (await ops.get('/api/imports').expect(200)).body as ImportBatchRecord[];
    const foreign = opsHistory.find((b) => b.who === 'Otto Brambleby')!;
    await manager.get(`/api/imports/${foreign.id}`).expect(404);
  });

  it('neutralises formula cells in the rejected-rows CSV and reads them back as text', async () => {
    const csv =
      'review_id,sku,title,category,stars,reviewed_at,text\n' +
      '=cmd-1,GT-7002,"=SUM(A1:A9)",garden-tools,9,2026-05-01,"@mention, +plus"\n';
    const batch = await importFile(ops, Buffer.from(csv), 'reviews', 'valid_rows', 'formula.csv');
    expect(batch.rowsRejected).toBe(1);
    const res = await ops.get(`/api/imports/${batch.id}/errors.csv`).expect(200);
    const [row] = errorsCsv(res.text);
    expect(row!.raw).toBe(`'=cmd-1,GT-7002,"=SUM(A1:A9)",garden-tools,9,2026-05-01,"@mention, +plus"`);
    for (const cell of Object.values(row!)) expect(cell).not.toMatch(/^[=+\-@]/);
  });

  it('refuses a file over the size limit (BALLAST_IMPORT_MAX_MB) with a clear 413', async () => {
    vi.stubEnv('BALLAST_IMPORT_MAX_MB', '1');
    try {
      const big = Buffer.alloc(1024 * 1024 + 10, 0x61);
      const res = await upload(ops, big, { kind: 'reviews', mode: 'valid_rows' }, 'huge.csv');
      expect(res.status).toBe(413);
      expect(res.body.error.message).toBe(
        'The file is larger than the limit of 1 MB. Split it into smaller files and import each.',
      );
    } finally {
      vi.unstubAllEnvs();
    }
  });

  it('refuses a file with an unknown column at once, naming the column', async () => {
    const csv =
      'review_id,sku,title,category,stars,reviewed_at,colour\nu-1,GT-1,T,garden-tools,4,2026-05-01,red\n';
    const res = await upload(ops, Buffer.from(csv), { kind: 'reviews', mode: 'valid_rows' }, 'colour.csv');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toContain('Unknown column "colour" (column 7)');
  });

  it('handles a file that breaks part-way: all or nothing keeps nothing, valid rows keeps the chunks before', async () => {
    const good = Array.from(
      { length: chunkRows + 10 },
      (_, i) => `brk-${i},GT-8${i % 7},Break Tool ${i % 7},garden-tools,4,2026-05-01`,
    );
    const csv = [
      'review_id,sku,title,category,stars,reviewed_at',
      ...good,
      'brk-x,GT-80,"never closed,garden-tools,4,2026-05-01',
      '',
    ].join('\n');
    const before = await count("SELECT COUNT(*) AS n FROM reviews WHERE external_id LIKE 'brk-%'");
    const strict = await importFile(ops, Buffer.from(csv), 'reviews', 'all_or_nothing', 'broken.csv');
    expect(strict.status).toBe('rejected');
    expect(strict.errorMessage).toContain('never closed');
    expect(await count("SELECT COUNT(*) AS n FROM reviews WHERE external_id LIKE 'brk-%'")).toBe(before);

    const lenient = await importFile(ops, Buffer.from(csv), 'reviews', 'valid_rows', 'broken.csv');
    expect(lenient.status).toBe('failed');
    expect(lenient.rowsAccepted).toBe(chunkRows);
    expect(lenient.errorMessage).toContain(`The ${chunkRows} valid rows read before that were imported`);
    expect(await count("SELECT COUNT(*) AS n FROM reviews WHERE external_id LIKE 'brk-%'")).toBe(chunkRows);
  });

  it('lists the history with who, file, kind, mode, counts and status', async () => {
    const res = await ops.get('/api/imports?limit=5').expect(200);
    const list = res.body as ImportBatchRecord[];
    expect(list.length).toBe(5);
    expect(list[0]).toMatchObject({ source: 'upload', kind: 'reviews' });
    expect(list.map((b) => b.id)).toEqual([...list.map((b) => b.id)].sort((a, b) => b - a));
  });
});
