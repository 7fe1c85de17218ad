import { createReadStream, readFileSync } from 'node:fs';
import path from 'node:path';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { rootDir } from '../../../server/config/env';
import { neutraliseCell } from '../../../server/modules/imports/csv-safe';
import { collectImport, ImportFileError, parseImport } from '../../../server/modules/imports/import-parser';
import { graphemeLength, type ImportKind } from '../../../shared/schemas/import.schema';

type Case = {
  file: string;
  kind: ImportKind;
  about: string;
  fileError?: string;
  /** The whole message a refused file gets. */
  message?: string;
  warnings?: string[];
  rowsRead?: number;
  goodRows?: number;
  rejected?: { line: number; column: string | null; reason: string }[];
};

const dir = path.join(rootDir, 'tests/fixtures/bad-input');
const manifest = JSON.parse(readFileSync(path.join(dir, 'expected.json'), 'utf8')) as {
  now: string;
  cases: Case[];
};
const now = new Date(manifest.now);

/** 200 MB of valid review rows, made on the fly so the repository stays small. */
function twoHundredMegabytes(): Readable {
  const header =
    'review_id,sku,title,category,stars,reviewed_at,helpful_yes,helpful_no,reviewer_id,reviewer_score,verified,text\n';
  const target = 200 * 1024 * 1024;
  let sent = 0;
  let i = 0;
  return new Readable({
    read() {
      if (sent >= target) return this.push(null);
      let chunk = i === 0 ? header : '';
      while (chunk.length < 64 * 1024) {
        chunk += `rv-${i},KB-${i % 500},Keelwood Trail Kettle ${i % 500},kettles-and-brewers,${1 + (i % 5)},2026-05-01,1,0,u-${i},,true,Boils fast and pours clean\n`;
        i += 1;
      }
      sent += chunk.length;
      this.push(chunk);
    },
  });
}

function open(file: string): Readable {
  return file.startsWith('generated:') ? twoHundredMegabytes() : createReadStream(path.join(dir, file));
}

describe('the bad-input corpus (tests/fixtures/bad-input)', () => {
  it('holds the files people really have: line ends, UTF-16, padding, headers, lengths, NUL, wide input', () => {
    // Issue 13 grew the corpus by these 29 files (each with its outcome in expected.json).
    const added = manifest.cases.filter((c) =>
      /^(line-ends|utf16le-|utf16be-|trailing-|header-|text-over|title-(300|501|family)|nul-in|multiline-|long-|wide-)/.test(
        c.file,
      ),
    );
    expect(added.length).toBeGreaterThanOrEqual(25);
  });

  it('holds at least 30 broken or hostile files, each with an expected outcome', () => {
    expect(manifest.cases.length).toBeGreaterThanOrEqual(30);
  });

  for (const c of manifest.cases.filter((entry) => !entry.file.startsWith('generated:'))) {
    it(`${c.file} (${c.about}) gives exactly the expected outcome`, async () => {
      if (c.fileError) {
        const outcome = await collectImport(open(c.file), c.kind, { now }).then(
          () => null,
          (err: unknown) => err,
        );
        expect(outcome).toBeInstanceOf(ImportFileError);
        expect((outcome as ImportFileError).code).toBe(c.fileError);
        expect((outcome as ImportFileError).message.length).toBeGreaterThan(20);
        // A short excerpt at most, whatever the file holds (a 200 KB line once came back whole).
        expect((outcome as ImportFileError).message.length).toBeLessThan(400);
        if (c.message !== undefined) expect((outcome as ImportFileError).message).toBe(c.message);
        return;
      }
      const result = await collectImport(open(c.file), c.kind, { now });
      expect(result.summary.rowsRead).toBe(c.rowsRead);
      // The good rows survive the bad ones.
      expect(result.rows).toHaveLength(c.goodRows!);
      expect(
        result.errors.map((e) => ({ line: e.line, column: e.column ?? null, reason: e.reason })),
      ).toEqual(c.rejected);
      if (c.warnings !== undefined) expect(result.summary.warnings).toEqual(c.warnings);
      for (const e of result.errors) expect(graphemeLength(e.raw ?? '')).toBeLessThanOrEqual(201);
    });
  }

  it('keeps formula cells as text and neutralises them when Ballast writes CSV', async () => {
    const result = await collectImport(open('formula-cells.csv'), 'reviews', { now });
    const texts = result.rows.map((r) => r.row.text);
    expect(texts).toContain('=HYPERLINK("http://example.invalid")');
    expect(result.rows.map((r) => r.row.title)).toContain('+SUM(A1:A9)');
    for (const value of [...texts, '+SUM(A1:A9)']) {
      if (value && /^[=+\-@]/.test(value)) expect(neutraliseCell(value)).toBe(`'${value}`);
    }
  });

  it('refuses the generated 200 MB file as too large without reading all of it', async () => {
    const generated = manifest.cases.find((c) => c.file.startsWith('generated:'))!;
    expect(generated.fileError).toBe('too_large');
    const parse = parseImport(open('generated:200mb-reviews.csv'), 'reviews', { now });
    let rows = 0;
    const err = await (async () => {
      try {
        for await (const record of parse) if ('row' in record) rows += 1;
      } catch (e) {
        return e;
      }
      return null;
    })();
    expect((err as ImportFileError).code).toBe('too_large');
    // Stopped near the 50 MB limit: about a quarter of the rows, never all of them.
    expect(rows).toBeLessThan(1_000_000);
  }, 120_000);
});
