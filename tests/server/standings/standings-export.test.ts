import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Standings } from '../../../shared/schemas/standings.schema';
import { cautionText } from '../../../shared/vocabulary';
import { db } from '../../../server/db/sequelize';
import { demoStory } from '../../../server/demo/scenario';
import { loadDemoForTests } from '../../helpers/demo-data';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let analyst: Agent;
const packs = 'trail-packs';

beforeAll(async () => {
  t = await setupTestApp();
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 2 });
  analyst = await t.signIn('analyst');
  // A title a spreadsheet would run as a formula if it were written as one.
  await db().query(`UPDATE items SET title = '=SUM(1,2)' WHERE sku = :sku`, {
    replacements: { sku: demoStory.buriedStrong.sku },
  });
}, 240_000);
afterAll(async () => t.close());

// supertest buffers unknown content types as binary only with a parser that collects the bytes.
const binary = (res: NodeJS.ReadableStream, done: (err: Error | null, body: unknown) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
};

async function csvOf(path: string): Promise<string[][]> {
  const text = (await analyst.get(path).expect(200)).text.replace(/^\uFEFF/, '');
  return parse(text) as string[][];
}

async function workbookOf(path: string): Promise<ExcelJS.Workbook> {
  const res = await analyst
    .get(path)
    .buffer(true)
    .parse(binary as never)
    .expect(200);
  expect(res.headers['content-type']).toBe(
    'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
  );
  const book = new ExcelJS.Workbook();
  const bytes = res.body as Buffer;
  await book.xlsx.load(
    bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer,
  );
  return book;
}

function sheetRows(sheet: ExcelJS.Worksheet, width: number): (string | number | null)[][] {
  const rows: (string | number | null)[][] = [];
  sheet.eachRow({ includeEmpty: false }, (row) => {
    const cells: (string | number | null)[] = [];
    for (let k = 1; k <= width; k++) {
      const v = row.getCell(k).value;
      cells.push(v === null || v === undefined ? null : (v as string | number));
    }
    rows.push(cells);
  });
  return rows;
}

describe('GET /api/categories/:slug/standings.csv', () => {
  it('carries the week, the category, C, m and the strategy on every row', async () => {
    const standings = (await analyst.get(`/api/categories/${packs}/standings`).expect(200)).body as Standings;
    const [header, ...rows] = await csvOf(`/api/categories/${packs}/standings.csv`);
    const at = (name: string) => header!.indexOf(name);
    for (const name of ['iso_week', 'category', 'prior_mean_c', 'prior_weight_m', 'prior_weight_strategy'])
      expect(at(name), name).toBeGreaterThanOrEqual(0);
    expect(rows.length).toBe(standings.total);
    for (const row of rows) {
      expect(row[at('iso_week')]).toBe(standings.week.isoWeek);
      expect(row[at('category')]).toBe('Trail Packs');
      expect(Number(row[at('prior_mean_c')])).toBeCloseTo(standings.C, 4);
      expect(Number(row[at('prior_weight_m')])).toBeCloseTo(standings.m, 4);
      expect(row[at('prior_weight_strategy')]).toBe('mean review count');
    }
  });
});

describe('GET /api/categories/:slug/standings.xlsx', () => {
  it('reads back with the same rows as the CSV of the same view', async () => {
    const query = '?sort=drift&dir=desc';
    const csv = await csvOf(`/api/categories/${packs}/standings.csv${query}`);
    const book = await workbookOf(`/api/categories/${packs}/standings.xlsx${query}`);
    const sheet = book.getWorksheet('Standings')!;
    const header = csv[0]!;
    const rows = sheetRows(sheet, header.length);
    expect(rows.length).toBe(csv.length);
    expect(rows[0]).toEqual(header);
    for (let r = 1; r < csv.length; r++) {
      const fromCsv = csv[r]!;
      const fromBook = rows[r]!;
      for (let k = 0; k < header.length; k++) {
        const cell = fromBook[k];
        // The CSV guards a formula-like text with a leading quote (OWASP CSV injection advice).
        const expected = fromCsv[k]!.replace(/^'(?=[=+\-@\t\r])/, '');
        if (typeof cell === 'number') expect(cell, `${header[k]} row ${r}`).toBeCloseTo(Number(expected), 4);
        else expect(cell ?? '', `${header[k]} row ${r}`).toBe(expected);
      }
    }
    const titles = rows.map((row) => row[header.indexOf('title')]);
    expect(titles).toContain('=SUM(1,2)');
    sheet.eachRow((row) => row.eachCell((cell) => expect(cell.type).not.toBe(ExcelJS.ValueType.Formula)));
  });

  it('has a second sheet with the parameters of the week and the cautions', async () => {
    const standings = (await analyst.get(`/api/categories/${packs}/standings`).expect(200)).body as Standings;
    const book = await workbookOf(`/api/categories/${packs}/standings.xlsx?q=TP-20`);
    const params = new Map(
      sheetRows(book.getWorksheet('Parameters')!, 2).map(([name, value]) => [String(name), value]),
    );
    expect(params.get('Week')).toBe(standings.week.isoWeek);
    expect(params.get('Category')).toBe('Trail Packs');
    expect(params.get('Prior mean C') as number).toBeCloseTo(standings.C, 10);
    expect(params.get('Prior weight m') as number).toBeCloseTo(standings.m, 10);
    expect(params.get('Prior weight strategy applied')).toBe('mean review count');
    for (const line of cautionText) expect(params.has(line), line).toBe(true);
  });
});
