import { createReadStream } from 'node:fs';
import { Readable } from 'node:stream';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { syntheticReviewRows, writeReviewCsv } from '../demo/scenario-csv';
import { ImportFileError, collectImport, parseImport } from '../modules/imports/import-parser';

const rowCount = 1_000_000;

/** Input that used to cost time in the square of its length: how long it takes to be refused. */
async function hostile(label: string, text: string): Promise<void> {
  const bytes = Buffer.from(text);
  // 64 KB chunks, as an upload arrives.
  const chunks: Buffer[] = [];
  for (let i = 0; i < bytes.length; i += 64 * 1024) chunks.push(bytes.subarray(i, i + 64 * 1024));
  const started = process.hrtime.bigint();
  const outcome = await collectImport(Readable.from(chunks), 'reviews', { now: new Date() }).then(
    () => 'accepted',
    (err: unknown) =>
      err instanceof ImportFileError ? `refused (${err.message.length}-character message)` : String(err),
  );
  const ms = Number(process.hrtime.bigint() - started) / 1e6;
  console.log(`${label}: ${outcome} in ${ms.toFixed(1)} ms`);
}

/** Parse speed and peak memory of the review importer alone (no database), on a 1,000,000-row file. */
export async function run(): Promise<void> {
  await hostile('a 200 KB line with no line break', 'x'.repeat(200 * 1024));
  await hostile(
    'a header of 100,000 columns',
    Array.from({ length: 100_000 }, (_, i) => `column_${i}`).join(',') + '\n',
  );
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
