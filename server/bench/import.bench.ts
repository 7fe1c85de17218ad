import { spawn } from 'node:child_process';
import { mkdtemp, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import mariadb from 'mariadb';
import type { ReviewRow } from '../../shared/schemas/import.schema';
import { syntheticReviewRows, writeReviewCsv } from '../demo/scenario-csv';
import { demoCategories } from '../demo/scenario';
import { startEmbeddedMariadb } from '../db/embedded-mariadb';
import { freePort } from '../lib/free-port';

/*
 * Ballast's review importer end to end (stream parse, validation, item look-up, batched upserts, progress)
 * on a generated 1,000,000-row file, against MariaDB's own LOAD DATA LOCAL INFILE of the same file on the
 * same throw-away server, twice: into a bare table without indexes (the old yardstick), and into a table
 * created LIKE reviews, so with the indexes and the unique key the importer maintains, its item ids looked
 * up from items by category and sku in the SET clause as the importer looks them up (the fair limit, issue
 * 20 point 3). The importer runs in a child process so that its peak memory is its own.
 */

const asOf = new Date('2026-11-30T00:00:00Z');
const pieceRows = 100_000;
const thisFile = fileURLToPath(import.meta.url);

type ChildResult = {
  seconds: number;
  rowsRead: number;
  rowsInserted: number;
  status: string;
  peakRss: number;
  peakHeap: number;
};

/** In the child: migrate, create the demo categories, import the file, report time and peak RSS. */
async function child(url: string, file: string): Promise<void> {
  const { openDatabase, closeDatabase } = await import('../db/sequelize');
  const { migrateUp } = await import('../db/migrator');
  const { Category } = await import('../db/models');
  const { setLogLevel } = await import('../lib/logger');
  const { importFileNow } = await import('../modules/imports/imports.service');
  const { loadConfig } = await import('../config/env');
  const { limitHeapGrowth } = await import('../runtime/heap');
  setLogLevel('warn');
  // The heap rule the server runs imports under (BALLAST_HEAP_GROWTH_PERCENT).
  limitHeapGrowth(loadConfig().heapGrowthPercent);
  const sequelize = openDatabase(url);
  await migrateUp(sequelize);
  for (const c of demoCategories)
    await Category.create({ slug: c.slug, name: c.name, description: c.description, settings: c.settings });
  let peakRss = process.memoryUsage().rss;
  let peakHeap = process.memoryUsage().heapUsed;
  const sampler = setInterval(() => {
    const m = process.memoryUsage();
    peakRss = Math.max(peakRss, m.rss);
    peakHeap = Math.max(peakHeap, m.heapUsed);
  }, 25);
  const started = process.hrtime.bigint();
  const outcome = await importFileNow(file, 'reviews', 'valid_rows');
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  clearInterval(sampler);
  peakRss = Math.max(peakRss, process.memoryUsage().rss);
  await closeDatabase();
  const result: ChildResult = {
    seconds,
    rowsRead: outcome.counters.rowsRead,
    rowsInserted: outcome.counters.rowsInserted,
    status: outcome.status,
    peakRss,
    peakHeap,
  };
  process.stdout.write(`RESULT ${JSON.stringify(result)}\n`);
}

function runChild(
  url: string,
  file: string,
  nodeFlags: string[],
  env: NodeJS.ProcessEnv = {},
): Promise<ChildResult> {
  return new Promise((resolve, reject) => {
    const proc = spawn(
      process.execPath,
      [...nodeFlags, '--import', 'tsx', thisFile, '--import-child', url, file],
      {
        stdio: ['ignore', 'pipe', 'inherit'],
        env: { ...process.env, ...env },
      },
    );
    let out = '';
    proc.stdout.on('data', (d: Buffer) => (out += d.toString()));
    proc.once('error', reject);
    proc.once('exit', (code) => {
      const line = out.split('\n').find((l) => l.startsWith('RESULT '));
      if (code !== 0 || !line) reject(new Error(`The importer child exited with ${code}:\n${out}`));
      else resolve(JSON.parse(line.slice(7)) as ChildResult);
    });
  });
}

/**
 * The same rows again, in files of 100,000: the mariadb connector (3.0.2) garbles a single LOCAL INFILE
 * transfer of more than about 16 MB, so MariaDB loads them one after the other and the times are added.
 */
async function writePieces(dir: string, rowCount: number): Promise<string[]> {
  const files: string[] = [];
  const rows = syntheticReviewRows(rowCount, { asOf });
  for (let start = 0; start < rowCount; start += pieceRows) {
    const piece: ReviewRow[] = [];
    for (let i = 0; i < pieceRows; i++) {
      const next = rows.next();
      if (next.done) break;
      piece.push(next.value);
    }
    const file = join(dir, `piece-${files.length}.csv`);
    await writeReviewCsv(piece, file);
    files.push(file);
  }
  return files;
}

async function freshDatabase(url: string, name: string): Promise<string> {
  const u = new URL(url);
  const conn = await mariadb.createConnection({
    host: u.hostname,
    port: Number(u.port),
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
  });
  await conn.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await conn.end();
  u.pathname = `/${name}`;
  return u.toString();
}

type LoadTarget = 'bare' | 'like_reviews';

/** The LOAD DATA statement for one piece; the column list and SET clause turn CSV cells into columns. */
function loadStatement(target: LoadTarget): string {
  const format = `CHARACTER SET utf8mb4
         FIELDS TERMINATED BY ',' OPTIONALLY ENCLOSED BY '"' ESCAPED BY ''
         LINES TERMINATED BY '\\n' IGNORE 1 LINES`;
  if (target === 'bare') return `LOAD DATA LOCAL INFILE ? INTO TABLE bare_reviews ${format}`;
  // The same conversions the importer makes: empty cells are NULL, ISO times in UTC, true/false.
  return `LOAD DATA LOCAL INFILE ? INTO TABLE like_reviews ${format}
         (@review_id, @sku, @title, @category, stars, @reviewed_at, helpful_yes, helpful_no, @reviewer_id,
          @reviewer_score, @verified, @text)
         SET item_id = (SELECT i.id FROM items i JOIN categories c ON c.id = i.category_id
                        WHERE c.slug = @category AND i.sku = @sku),
             external_id = @review_id,
             reviewed_at = STR_TO_DATE(@reviewed_at, '%Y-%m-%dT%H:%i:%sZ'),
             reviewer_external_id = NULLIF(@reviewer_id, ''),
             reviewer_score = NULLIF(@reviewer_score, ''),
             verified = CASE @verified WHEN 'true' THEN 1 WHEN 'false' THEN 0 ELSE NULL END,
             body = NULLIF(@text, ''),
             import_batch_id = NULL, created_at = UTC_TIMESTAMP(), updated_at = UTC_TIMESTAMP()`;
}

async function loadDataInfile(
  url: string,
  files: string[],
  target: LoadTarget,
): Promise<{ seconds: number; rows: number }> {
  const u = new URL(url);
  const options = {
    host: u.hostname,
    port: Number(u.port),
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    database: u.pathname.slice(1),
  };
  // The connector sends the file in packets that can outgrow the 16 MB default; allow them for this run.
  const setup = await mariadb.createConnection(options);
  await setup.query('SET GLOBAL max_allowed_packet = 1073741824');
  await setup.end();
  const conn = await mariadb.createConnection({
    host: u.hostname,
    port: Number(u.port),
    user: decodeURIComponent(u.username),
    password: decodeURIComponent(u.password),
    database: u.pathname.slice(1),
    permitLocalInfile: true,
  });
  try {
    if (target === 'bare')
      await conn.query(`CREATE TABLE bare_reviews (
      review_id VARCHAR(128), sku VARCHAR(64), title VARCHAR(500), category VARCHAR(64), stars TINYINT,
      reviewed_at VARCHAR(40), helpful_yes INT, helpful_no INT, reviewer_id VARCHAR(128),
      reviewer_score DECIMAL(4,3), verified VARCHAR(5), text TEXT
    ) ENGINE=InnoDB DEFAULT CHARSET=utf8mb4`);
    // LIKE copies the columns, the primary key, the unique key (item, external id) and every index.
    else await conn.query('CREATE TABLE like_reviews LIKE reviews');
    let seconds = 0;
    let rows = 0;
    for (const file of files) {
      const started = process.hrtime.bigint();
      const result = (await conn.query(loadStatement(target), [file])) as { affectedRows: number };
      seconds += Number(process.hrtime.bigint() - started) / 1e9;
      rows += Number(result.affectedRows);
    }
    if (target === 'like_reviews') {
      const [check] = (await conn.query(
        'SELECT COUNT(*) AS n, SUM(item_id IS NULL OR item_id = 0) AS unmatched FROM like_reviews',
      )) as { n: bigint; unmatched: string | null }[];
      if (Number(check!.unmatched ?? 0) > 0)
        throw new Error(
          `LOAD DATA left ${check!.unmatched} reviews without an item; the comparison is void.`,
        );
    }
    return { seconds, rows };
  } finally {
    await conn.end();
  }
}

export async function run({
  rowCount = 1_000_000,
  nodeFlags = [],
}: {
  rowCount?: number;
  /** Extra node options for the importer process, e.g. ['--cpu-prof'] or ['--max-old-space-size=256']. */
  nodeFlags?: string[];
} = {}): Promise<void> {
  const dir = await mkdtemp(join(tmpdir(), 'ballast-import-bench-'));
  const file = join(dir, 'reviews.csv');
  const db = await startEmbeddedMariadb({
    dir: join(dir, 'db'),
    port: await freePort(),
    database: 'ballast_bench',
  });
  try {
    const generated = Date.now();
    await writeReviewCsv(syntheticReviewRows(rowCount, { asOf }), file);
    const { size } = await stat(file);
    console.log(
      `generated ${rowCount.toLocaleString('en')} review rows, ${(size / 1024 / 1024).toFixed(0)} MB, in ${((Date.now() - generated) / 1000).toFixed(1)} s`,
    );

    const importer = await runChild(db.url, file, nodeFlags);
    if (importer.status !== 'succeeded' || importer.rowsInserted !== rowCount)
      throw new Error(`The importer did not import every row: ${JSON.stringify(importer)}`);
    const pieces = await writePieces(dir, rowCount);
    const bare = await loadDataInfile(db.url, pieces, 'bare');
    const fair = await loadDataInfile(db.url, pieces, 'like_reviews');
    const importRate = importer.rowsRead / importer.seconds;
    const bareRate = bare.rows / bare.seconds;
    const fairRate = fair.rows / fair.seconds;
    console.log(
      `Ballast importer:      ${Math.round(importRate).toLocaleString('en')} rows/s (${importer.rowsRead.toLocaleString('en')} rows in ${importer.seconds.toFixed(1)} s)`,
    );
    console.log(
      `LOAD DATA LOCAL INFILE: ${Math.round(fairRate).toLocaleString('en')} rows/s (${fair.rows.toLocaleString('en')} rows in ${fair.seconds.toFixed(1)} s, table LIKE reviews: same indexes and unique key, item ids looked up)`,
    );
    console.log(
      `LOAD DATA LOCAL INFILE: ${Math.round(bareRate).toLocaleString('en')} rows/s (${bare.rows.toLocaleString('en')} rows in ${bare.seconds.toFixed(1)} s, bare table without indexes)`,
    );
    console.log(
      `ratio importer / LOAD DATA into a table LIKE reviews: ${(importRate / fairRate).toFixed(2)} (aim: at least 0.5)`,
    );
    console.log(
      `ratio importer / LOAD DATA into a bare table: ${(importRate / bareRate).toFixed(2)} (no aim; the old yardstick)`,
    );
    const loadRate = fairRate;
    const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(0)} MB`;
    console.log(
      `importer peak RSS: ${mb(importer.peakRss)} (aim: under 300 MB; peak JS heap ${mb(importer.peakHeap)})`,
    );
    // Under V8's own rule the heap grows with the allocation rate, not with what the importer keeps.
    const lazy = await runChild(await freshDatabase(db.url, 'ballast_bench_v8_default'), file, nodeFlags, {
      BALLAST_HEAP_GROWTH_PERCENT: '0',
    });
    console.log(
      `with V8's own heap growth (BALLAST_HEAP_GROWTH_PERCENT=0): ${Math.round(lazy.rowsRead / lazy.seconds).toLocaleString('en')} rows/s, ` +
        `ratio ${(lazy.rowsRead / lazy.seconds / loadRate).toFixed(2)}, peak RSS ${mb(lazy.peakRss)} (JS heap ${mb(lazy.peakHeap)})`,
    );
  } finally {
    await db.stop();
    await rm(dir, { recursive: true, force: true });
  }
}

const childAt = process.argv.indexOf('--import-child');
if (childAt !== -1) {
  child(process.argv[childAt + 1]!, process.argv[childAt + 2]!).then(
    () => process.exit(0),
    (err: unknown) => {
      console.error(err);
      process.exit(1);
    },
  );
}
