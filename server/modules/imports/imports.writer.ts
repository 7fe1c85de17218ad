import type { Transaction } from 'sequelize';
import type { AggregateRow, ImportKind, ReviewRow, RowError } from '../../../shared/schemas/import.schema';
import { storedRowErrorsMax, type ImportMode } from '../../../shared/schemas/imports-api.schema';
import { db } from '../../db/sequelize';
import { AppError } from '../../lib/app-error';
import { countOf } from '../../../shared/plural';
import { ImportFileError, type ParsedRecord, type RowOf } from './import-parser';

/*
 * Writes parsed rows into MariaDB. The one place where imports touch the review tables, shared by uploads,
 * the ingest API and the demo loader.
 *
 * Atomicity and resuming:
 * - "import the valid rows": one transaction per chunk of rows. The chunk's reviews, its row errors and the
 *   batch's counters (rows read, accepted, ..., bytes done) commit together, so the batch row always
 *   describes exactly what is in the database. After a crash the file is parsed again from the start (the
 *   cross-row rules need every earlier row) and the first `rowsRead` records, already committed, are
 *   skipped. Re-applying a chunk would be harmless anyway: the writes are upserts keyed by (item, external id).
 * - "all or nothing": one transaction for the whole import (no second pass over a file of up to 250 MB).
 *   Progress is written outside it so that it can be watched; at the end the transaction commits together
 *   with the final status, or rolls back on the first bad row or a refused file. A crash rolls it back, so
 *   resuming means starting again.
 */

export const chunkRows = 5_000;
/** Also flush before a chunk's statement nears MariaDB's default max_allowed_packet (16 MB). */
const chunkBytes = 4 * 1024 * 1024;

type RawConnection = {
  query: (sql: string, values?: unknown[]) => Promise<unknown>;
  batch: (sql: string, values: unknown[][]) => Promise<unknown>;
};
type OkPacket = { affectedRows: number };

/** Sequelize's transaction holds the driver connection; multi-row statements go straight to it for speed. */
function raw(t: Transaction): RawConnection {
  return (t as unknown as { connection: RawConnection }).connection;
}

async function exec(t: Transaction, sql: string, values: unknown[]): Promise<OkPacket> {
  return (await raw(t).query(sql, values)) as OkPacket;
}

/** One statement, many rows, sent with MariaDB's bulk protocol: no giant SQL text to build and parse. */
async function bulk(t: Transaction, sql: string, rows: unknown[][]): Promise<OkPacket> {
  return (await raw(t).batch(sql, rows)) as OkPacket;
}

async function select<T>(t: Transaction, sql: string, values: unknown[]): Promise<T[]> {
  return (await raw(t).query(sql, values)) as T[];
}

const sqlTime = (date: Date): string => date.toISOString().slice(0, 19).replace('T', ' ');
const placeholders = (n: number): string => `(${new Array<string>(n).fill('?').join(',')})`;

export type Counters = {
  rowsRead: number;
  rowsAccepted: number;
  rowsRejected: number;
  rowsInserted: number;
  rowsUpdated: number;
  bytesDone: number;
};

export const zeroCounters = (): Counters => ({
  rowsRead: 0,
  rowsAccepted: 0,
  rowsRejected: 0,
  rowsInserted: 0,
  rowsUpdated: 0,
  bytesDone: 0,
});

export type CategoryScope = {
  bySlug: Map<string, number>;
  /** Categories the caller may write; null: all. */
  allowed: number[] | null;
};

export async function loadCategoryScope(allowed: number[] | null): Promise<CategoryScope> {
  const [rows] = (await db().query('SELECT id, slug FROM categories')) as [
    { id: number; slug: string }[],
    unknown,
  ];
  return { bySlug: new Map(rows.map((r) => [r.slug, Number(r.id)])), allowed };
}

/** The category id of a row, or the reason it may not be written. */
export function checkCategory(scope: CategoryScope, slug: string): number | string {
  const id = scope.bySlug.get(slug);
  if (id === undefined) return `unknown category: ${slug}`;
  if (scope.allowed && !scope.allowed.includes(id)) return `not one of your categories: ${slug}`;
  return id;
}

type Placed<K extends ImportKind> = { line: number; row: RowOf<K>; categoryId: number };

/**
 * Writes that collided with another import at the same moment: a deadlock (1213), a lock wait that ran
 * out (1205) or a unique key taken in between (1062). The transaction is tried again a few times.
 */
const conflictErrnos = new Set([1213, 1205, 1062]);
export const writeAttempts = 4;

export function isWriteConflict(error: unknown): boolean {
  for (
    let e = error as { errno?: number; parent?: unknown; original?: unknown; cause?: unknown } | null, i = 0;
    e && i < 5;
    i++
  ) {
    if (typeof e.errno === 'number' && conflictErrnos.has(e.errno)) return true;
    e = (e.parent ?? e.original ?? e.cause ?? null) as typeof e;
  }
  return false;
}

/** Another import kept writing the same rows; the caller may send the import again. */
export class ImportConflictError extends AppError {
  constructor(message: string) {
    super('conflict', message, 409);
  }
}

export const conflictMessage =
  'Another import was writing to the same items at the same time, and this one could not finish after ' +
  'several tries; nothing was imported. Try again in a moment.';

/** A short, random pause before another try, so two colliding imports do not collide again in step. */
export const conflictPause = (attempt: number): Promise<void> =>
  new Promise((resolve) => setTimeout(resolve, 20 * attempt + Math.floor(Math.random() * 50)));

/** Item ids by category and sku, created on first sight (the title of that first row wins). */
class ItemCache {
  private readonly ids = new Map<string, number>();
  /** Ids learnt in the transaction still open; forgotten if it rolls back (the items may not exist). */
  private fresh: string[] = [];

  private static key(categoryId: number, sku: string): string {
    // Skus arrive in key form (shared/keys.ts) and the column compares exactly, so the cache does too.
    return `${categoryId}\u0000${sku}`;
  }

  committed(): void {
    this.fresh = [];
  }

  rolledBack(): void {
    for (const key of this.fresh) this.ids.delete(key);
    this.fresh = [];
  }

  async resolve(
    t: Transaction,
    rows: { categoryId: number; sku: string; title: string }[],
  ): Promise<number[]> {
    const missing = new Map<string, { categoryId: number; sku: string; title: string }>();
    for (const r of rows) {
      const key = ItemCache.key(r.categoryId, r.sku);
      if (!this.ids.has(key) && !missing.has(key)) missing.set(key, r);
    }
    if (missing.size > 0) {
      // In key order, so two imports creating the same items lock them in the same order.
      const list = [...missing.values()].sort((a, b) =>
        a.categoryId !== b.categoryId
          ? a.categoryId - b.categoryId
          : a.sku < b.sku
            ? -1
            : a.sku > b.sku
              ? 1
              : 0,
      );
      const now = sqlTime(new Date());
      await exec(
        t,
        `INSERT INTO items (category_id, sku, title, active, created_at, updated_at) VALUES ${list
          .map(() => '(?,?,?,1,?,?)')
          .join(',')} ON DUPLICATE KEY UPDATE id = id`,
        list.flatMap((r) => [r.categoryId, r.sku, r.title, now, now]),
      );
      const byCategory = groupBy(list, (r) => r.categoryId);
      const where = [...byCategory.entries()]
        .map(([, skus]) => `(category_id = ? AND sku IN ${placeholders(skus.length)})`)
        .join(' OR ');
      // A locking read sees items another import committed after this transaction's snapshot was taken.
      const found = await select<{ id: number; category_id: number; sku: string }>(
        t,
        `SELECT id, category_id, sku FROM items WHERE ${where} LOCK IN SHARE MODE`,
        [...byCategory.entries()].flatMap(([categoryId, skus]) => [categoryId, ...skus.map((s) => s.sku)]),
      );
      for (const f of found) {
        const key = ItemCache.key(Number(f.category_id), f.sku);
        if (!this.ids.has(key)) this.fresh.push(key);
        this.ids.set(key, Number(f.id));
      }
    }
    return rows.map((r) => {
      const id = this.ids.get(ItemCache.key(r.categoryId, r.sku));
      if (id === undefined) throw new Error(`Item ${r.sku} could not be created`);
      return id;
    });
  }
}

function groupBy<T, K>(list: T[], key: (item: T) => K): Map<K, T[]> {
  const out = new Map<K, T[]>();
  for (const item of list) {
    const k = key(item);
    const group = out.get(k);
    if (group) group.push(item);
    else out.set(k, [item]);
  }
  return out;
}

/**
 * One multi-row upsert. A row whose values are all unchanged is left alone (MariaDB then counts it as 0
 * affected rows, an insert as 1, a change as 2), so re-importing the same file changes nothing, not even
 * updated_at. The session variable counts the rows that already existed, which splits the affected rows
 * into inserts and updates without a look-up before the write.
 */
function upsertSql(table: string, columns: string[], dataColumns: string[], rows: number): string {
  const same = dataColumns.map((c) => `${c} <=> VALUES(${c})`).join(' AND ');
  return (
    `INSERT INTO ${table} (${columns.join(', ')}) VALUES ${new Array<string>(rows)
      .fill(placeholders(columns.length))
      .join(',')} ` +
    `ON DUPLICATE KEY UPDATE updated_at = IF((@ballast_existing := @ballast_existing + 1) > 0 AND ${same}, updated_at, VALUES(updated_at)), ` +
    `import_batch_id = IF(${same}, import_batch_id, VALUES(import_batch_id)), ` +
    dataColumns.map((c) => `${c} = VALUES(${c})`).join(', ')
  );
}

const reviewData = [
  'stars',
  'reviewed_at',
  'helpful_yes',
  'helpful_no',
  'reviewer_external_id',
  'reviewer_score',
  'verified',
  'body',
];
const aggregateData = [
  'review_count',
  'mean_stars',
  'stars_1',
  'stars_2',
  'stars_3',
  'stars_4',
  'stars_5',
  'newest_review_at',
];

async function writeChunk<K extends ImportKind>(
  t: Transaction,
  kind: K,
  batchId: number,
  items: ItemCache,
  rows: Placed<K>[],
): Promise<{ inserted: number; updated: number }> {
  if (rows.length === 0) return { inserted: 0, updated: 0 };
  const itemIds = await items.resolve(
    t,
    rows.map((r) => ({ categoryId: r.categoryId, sku: r.row.sku, title: r.row.title })),
  );
  const now = sqlTime(new Date());
  let result: OkPacket;
  await exec(t, 'SET @ballast_existing = 0', []);
  if (kind === 'reviews') {
    const list = rows as Placed<'reviews'>[];
    const columns = ['item_id', 'external_id', ...reviewData, 'import_batch_id', 'created_at', 'updated_at'];
    const values: unknown[][] = [];
    // In index order, so the B-tree inserts of a chunk walk the unique index once instead of jumping about.
    const order = list
      .map((_, i) => i)
      .sort((a, b) => itemIds[a]! - itemIds[b]! || (list[a]!.row.reviewId < list[b]!.row.reviewId ? -1 : 1));
    order.forEach((i) => {
      const row: ReviewRow = list[i]!.row;
      values.push([
        itemIds[i],
        row.reviewId,
        row.stars,
        sqlTime(row.reviewedAt),
        row.helpfulYes,
        row.helpfulNo,
        row.reviewerId,
        row.reviewerScore === null ? null : row.reviewerScore.toFixed(3),
        row.verified === null ? null : row.verified ? 1 : 0,
        row.text,
        batchId,
        now,
        now,
      ]);
    });
    result = await bulk(t, upsertSql('reviews', columns, reviewData, 1), values);
  } else {
    const list = rows as Placed<'aggregates'>[];
    const columns = [
      'item_id',
      'observed_on',
      ...aggregateData,
      'import_batch_id',
      'created_at',
      'updated_at',
    ];
    const values: unknown[][] = [];
    list.forEach(({ row }: { row: AggregateRow }, i) => {
      const h = row.histogram;
      values.push([
        itemIds[i],
        row.observedOn,
        row.reviewCount,
        row.meanStars === null ? null : row.meanStars.toFixed(5),
        h?.[0] ?? null,
        h?.[1] ?? null,
        h?.[2] ?? null,
        h?.[3] ?? null,
        h?.[4] ?? null,
        row.newestReviewAt ? sqlTime(row.newestReviewAt) : null,
        batchId,
        now,
        now,
      ]);
    });
    result = await bulk(t, upsertSql('aggregate_observations', columns, aggregateData, 1), values);
  }
  const [counted] = await select<{ existing: number | bigint | string }>(
    t,
    'SELECT @ballast_existing AS existing',
    [],
  );
  const inserted = rows.length - Number(counted?.existing ?? 0);
  return { inserted, updated: Math.max(0, (Number(result.affectedRows) - inserted) / 2) };
}

async function storeErrors(t: Transaction, batchId: number, errors: RowError[]): Promise<void> {
  for (let i = 0; i < errors.length; i += 1_000) {
    const part = errors.slice(i, i + 1_000);
    await exec(
      t,
      `INSERT INTO import_row_errors (batch_id, line, column_name, reason, raw) VALUES ${part
        .map(() => '(?,?,?,?,?)')
        .join(',')}`,
      part.flatMap((e) => [
        batchId,
        Math.max(0, e.line),
        e.column ? e.column.slice(0, 60) : null,
        e.reason.slice(0, 500),
        e.raw ?? null,
      ]),
    );
  }
}

async function saveCounters(
  t: Transaction | null,
  batchId: number,
  c: Counters,
  extra: { status?: string; errorMessage?: string | null; finished?: boolean } = {},
): Promise<void> {
  const sets = [
    'rows_read = ?',
    'rows_accepted = ?',
    'rows_rejected = ?',
    'rows_inserted = ?',
    'rows_updated = ?',
    'bytes_done = ?',
    'updated_at = ?',
  ];
  const now = sqlTime(new Date());
  const values: unknown[] = [
    c.rowsRead,
    c.rowsAccepted,
    c.rowsRejected,
    c.rowsInserted,
    c.rowsUpdated,
    c.bytesDone,
    now,
  ];
  if (extra.status) {
    sets.push('status = ?');
    values.push(extra.status);
  }
  if (extra.errorMessage !== undefined) {
    sets.push('error_message = ?');
    values.push(extra.errorMessage?.slice(0, 1000) ?? null);
  }
  if (extra.finished) {
    sets.push('finished_at = ?');
    values.push(now);
  }
  values.push(batchId);
  const sql = `UPDATE import_batches SET ${sets.join(', ')} WHERE id = ?`;
  if (t) await exec(t, sql, values);
  else await db().query(sql, { replacements: values });
}

export type WriteOptions = {
  batchId: number;
  kind: ImportKind;
  mode: ImportMode;
  scope: CategoryScope;
  /** Counters already committed by an interrupted run ("import the valid rows" only). */
  resumeFrom?: Counters;
  /** Bytes of the source read so far, for progress. */
  bytesRead?: () => number;
};

export type WriteOutcome = {
  status: 'succeeded' | 'rejected' | 'failed';
  counters: Counters;
  errorMessage: string | null;
  /** Row errors found in this run (all of them for an ingest request, up to the storage cap). */
  errors: RowError[];
};

/**
 * Streams records into the database for one import batch and leaves the batch row finished (succeeded,
 * rejected or failed). Throws only on database trouble; the caller then marks the batch failed.
 */
export async function writeRecords<K extends ImportKind>(
  records: AsyncIterable<ParsedRecord<K>> | Iterable<ParsedRecord<K>>,
  options: WriteOptions,
): Promise<WriteOutcome> {
  const { batchId, kind, mode, scope } = options;
  const sequelize = db();
  const allOrNothing = mode === 'all_or_nothing';
  const skip = allOrNothing ? 0 : (options.resumeFrom?.rowsRead ?? 0);
  const counters: Counters = allOrNothing ? zeroCounters() : { ...(options.resumeFrom ?? zeroCounters()) };
  let stored = allOrNothing ? 0 : counters.rowsRejected;
  const items = new ItemCache();
  const errors: RowError[] = [];
  let pendingRows: Placed<K>[] = [];
  let pendingErrors: RowError[] = [];
  let pendingRead = 0;
  let pendingBytes = 0;
  let seen = 0;
  const outer = allOrNothing ? await sequelize.transaction() : null;
  // One chunk is written while the next one is parsed, so Node and MariaDB work at the same time.
  let inflight: Promise<void> | null = null;

  const write = async (
    rows: Placed<K>[],
    rowErrors: RowError[],
    read: number,
    bytes: number,
  ): Promise<void> => {
    const next: Counters = {
      ...counters,
      rowsRead: counters.rowsRead + read,
      rowsRejected: counters.rowsRejected + rowErrors.length,
      bytesDone: Math.max(counters.bytesDone, bytes),
    };
    if (outer) {
      // After the first bad row nothing will be kept, so there is no point in writing more.
      if (next.rowsRejected === 0) {
        const { inserted, updated } = await writeChunk(outer, kind, batchId, items, rows);
        next.rowsAccepted += rows.length;
        next.rowsInserted += inserted;
        next.rowsUpdated += updated;
      }
      for (const e of rowErrors) if (errors.length < storedRowErrorsMax) errors.push(e);
      Object.assign(counters, next);
      await saveCounters(null, batchId, counters);
      return;
    }
    const keep = rowErrors.slice(0, Math.max(0, storedRowErrorsMax - stored));
    for (let attempt = 1; ; attempt++) {
      try {
        await sequelize.transaction(async (t) => {
          const { inserted, updated } = await writeChunk(t, kind, batchId, items, rows);
          await storeErrors(t, batchId, keep);
          await saveCounters(t, batchId, {
            ...next,
            rowsAccepted: next.rowsAccepted + rows.length,
            rowsInserted: next.rowsInserted + inserted,
            rowsUpdated: next.rowsUpdated + updated,
          });
          next.rowsAccepted += rows.length;
          next.rowsInserted += inserted;
          next.rowsUpdated += updated;
        });
        items.committed();
        break;
      } catch (error) {
        items.rolledBack();
        if (!isWriteConflict(error)) throw error;
        if (attempt >= writeAttempts) throw new ImportConflictError(conflictMessage);
        await conflictPause(attempt);
      }
    }
    stored += keep.length;
    errors.push(...keep);
    Object.assign(counters, next);
  };

  const flush = async (): Promise<void> => {
    if (pendingRead === 0) return;
    const chunk = [pendingRows, pendingErrors, pendingRead, options.bytesRead?.() ?? 0] as const;
    pendingRows = [];
    pendingErrors = [];
    pendingRead = 0;
    pendingBytes = 0;
    if (inflight) await inflight;
    inflight = write(...chunk);
    // Handled where it is awaited; this only keeps Node from calling it unhandled in the meantime.
    inflight.catch(() => undefined);
  };
  const settle = async (): Promise<void> => {
    const last = inflight;
    inflight = null;
    if (last) await last;
  };

  try {
    for await (const record of records) {
      seen++;
      if (seen <= skip) continue;
      pendingRead++;
      if ('error' in record) {
        pendingErrors.push(record.error);
      } else {
        const category = checkCategory(scope, record.row.category);
        if (typeof category === 'string')
          pendingErrors.push({
            line: record.line,
            column: 'category',
            reason: category,
            raw: excerpt(record.row),
          });
        else {
          pendingRows.push({ line: record.line, row: record.row, categoryId: category });
          pendingBytes +=
            200 + record.row.title.length + ('text' in record.row ? (record.row.text?.length ?? 0) : 0);
        }
      }
      if (pendingRead >= chunkRows || pendingBytes >= chunkBytes) await flush();
    }
    await flush();
    await settle();
  } catch (error) {
    // A write still running must end before the batch is judged (its transaction commits or rolls back).
    await (inflight as Promise<void> | null)?.catch(() => undefined);
    if (outer) await outer.rollback().catch(() => undefined);
    if (isWriteConflict(error) || error instanceof ImportConflictError) {
      const message =
        !outer && counters.rowsAccepted > 0
          ? conflictMessage.replace(
              'nothing was imported',
              `the ${counters.rowsAccepted} valid rows counted as accepted were imported, the rest not (rows already imported are recognised, not duplicated)`,
            )
          : conflictMessage;
      await saveCounters(
        null,
        batchId,
        outer ? { ...zeroCounters(), bytesDone: counters.bytesDone } : counters,
        {
          status: 'failed',
          errorMessage: message,
          finished: true,
        },
      );
      throw new ImportConflictError(message);
    }
    if (!(error instanceof ImportFileError)) throw error;
    if (outer) {
      const reset = { ...zeroCounters(), bytesDone: counters.bytesDone };
      await saveCounters(null, batchId, reset, {
        status: 'rejected',
        errorMessage: `${error.message} Nothing was imported.`,
        finished: true,
      });
      return { status: 'rejected', counters: reset, errorMessage: error.message, errors: [] };
    }
    const message =
      counters.rowsAccepted > 0
        ? `${error.message} The ${counters.rowsAccepted} valid rows read before that were imported; ` +
          'fix the file and import it again (rows already imported are recognised, not duplicated).'
        : `${error.message} Nothing was imported.`;
    await saveCounters(null, batchId, counters, { status: 'failed', errorMessage: message, finished: true });
    return { status: 'failed', counters, errorMessage: message, errors };
  }

  if (outer) {
    if (counters.rowsRejected > 0) {
      await outer.rollback();
      const rejected: Counters = { ...counters, rowsAccepted: 0, rowsInserted: 0, rowsUpdated: 0 };
      const message = `${counters.rowsRejected.toLocaleString('en-GB')} of ${countOf(counters.rowsRead, 'row')} ${counters.rowsRejected === 1 ? 'has a mistake' : 'have mistakes'}, so nothing was imported (all or nothing).`;
      await sequelize.transaction(async (t) => {
        await storeErrors(t, batchId, errors);
        await saveCounters(t, batchId, rejected, {
          status: 'rejected',
          errorMessage: message,
          finished: true,
        });
      });
      return { status: 'rejected', counters: rejected, errorMessage: message, errors };
    }
    try {
      await saveCounters(outer, batchId, counters, {
        status: 'succeeded',
        errorMessage: null,
        finished: true,
      });
      await outer.commit();
    } catch (error) {
      await outer.rollback().catch(() => undefined);
      if (!isWriteConflict(error)) throw error;
      await saveCounters(null, batchId, zeroCounters(), {
        status: 'failed',
        errorMessage: conflictMessage,
        finished: true,
      });
      throw new ImportConflictError(conflictMessage);
    }
    return { status: 'succeeded', counters, errorMessage: null, errors };
  }
  await saveCounters(null, batchId, counters, { status: 'succeeded', errorMessage: null, finished: true });
  return { status: 'succeeded', counters, errorMessage: null, errors };
}

/** A readable stand-in for the raw line of a row that parsed but may not be written. */
function excerpt(row: ReviewRow | AggregateRow): string {
  return 'reviewId' in row
    ? `${row.reviewId},${row.sku},${row.category}`
    : `${row.sku},${row.category},${row.observedOn}`;
}

export async function* fromArray<T>(items: Iterable<T>): AsyncGenerator<T> {
  yield* items;
}
