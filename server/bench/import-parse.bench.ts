import { createReadStream } from 'node:fs';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { syntheticReviewRows, writeReviewCsv } from '../demo/scenario-csv';
import { parseImport } from '../modules/imports/import-parser';

const rowCount = 1_000_000;

/** Parse speed and peak memory of the review importer alone (no database), on a 1,000,000-row file. */
export async function run(): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'ballast-import-bench-'));
  const file = join(dir, 'reviews.csv');
  try {
    const asOf = new Date('2026-11-30T00:00:00Z');
    const generated = Date.now();
    await writeReviewCsv(syntheticReviewRows(rowCount, { asOf }), file);
    const { size } = await stat(file);
    console.log(
      `generated ${rowCount} rows, ${(size / 1024 / 1024).toFixed(0)} MB in ${((Date.now() - generated) / 1000).toFixed(1)} s`,
    );

    const rssBefore = process.memoryUsage().rss;
    let peakRss = rssBefore;
    const sampler = setInterval(() => (peakRss = Math.max(peakRss, process.memoryUsage().rss)), 50);
    const started = process.hrtime.bigint();
    const parse = parseImport(createReadStream(file), 'reviews', { now: asOf, maxBytes: size + 1 });
    let records = 0;
    for await (const record of parse) {
      void record;
      records++;
    }
    const seconds = Number(process.hrtime.bigint() - started) / 1e9;
    clearInterval(sampler);
    peakRss = Math.max(peakRss, process.memoryUsage().rss);

    const { rowsValid, rowsInvalid } = parse.summary;
    console.log(
      `parsed ${records} rows (${rowsValid} valid, ${rowsInvalid} invalid) in ${seconds.toFixed(1)} s`,
    );
    console.log(`parse rate: ${Math.round(records / seconds)} rows/s`);
    console.log(
      `RSS before parsing ${(rssBefore / 1024 / 1024).toFixed(0)} MB, peak while parsing ${(peakRss / 1024 / 1024).toFixed(0)} MB`,
    );
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
