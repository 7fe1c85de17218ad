import { createReadStream, mkdirSync, type ReadStream } from 'node:fs';
import { rm, stat } from 'node:fs/promises';
import path from 'node:path';
import { Op } from 'sequelize';
import {
  CrossRowRules,
  createAggregateJsonRowSchema,
  createReviewJsonRowSchema,
  nulProblems,
  titleFits,
  titleMissingReason,
  type AggregateRow,
  type ImportKind,
  type ReviewRow,
  type RowError,
} from '../../../shared/schemas/import.schema';
import {
  previewRowCount,
  type ImportBatchRecord,
  type ImportMode,
  type ImportPreview,
  type IngestResult,
} from '../../../shared/schemas/imports-api.schema';
import { keyOf } from '../../../shared/keys';
import { loadConfig } from '../../config/env';
import { ApiToken, CategoryOwner, ImportBatch, ImportRowError, User } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { logger } from '../../lib/logger';
import { runInWorker } from '../../workers/pool';
import type { PreviewRead } from '../../workers/tasks';
import { evidenceArrived } from '../alerts/alert-events';
import { rejectedRowsCsv } from './csv-safe';
import { claimImport, importWorkerId, keepLeases, newLease, releaseImport } from './import-leases';
import { parseImport, type Delimiter, type ParsedRecord } from './import-parser';
import {
  conflictPause,
  fromArray,
  ImportConflictError,
  loadCategoryScope,
  checkCategory,
  writeAttempts,
  writeRecords,
  zeroCounters,
  type Counters,
  type WriteOptions,
  type WriteOutcome,
} from './imports.writer';

/**
 * An all-or-nothing import is one transaction, so when it collides with another import (a deadlock) the
 * whole of it is tried again, from a fresh read of its rows, a few times. "Valid rows" imports retry each
 * chunk inside the writer instead.
 */
async function writeWithRetries(
  records: () => AsyncIterable<ParsedRecord<ImportKind>>,
  options: WriteOptions,
): Promise<WriteOutcome> {
  for (let attempt = 1; ; attempt++) {
    try {
      const outcome = await writeRecords(records(), options);
      if (outcome.counters.rowsInserted + outcome.counters.rowsUpdated > 0)
        evidenceArrived({ source: 'import', importBatchId: options.batchId });
      return outcome;
    } catch (error) {
      if (!(error instanceof ImportConflictError) || options.mode !== 'all_or_nothing') throw error;
      if (attempt >= writeAttempts) throw error;
      await conflictPause(attempt);
      await ImportBatch.update(
        { status: 'running', errorMessage: null, finishedAt: null },
        { where: { id: options.batchId } },
      );
    }
  }
}

/** Where uploads wait while they are imported, and how large they may be; read from the configuration. */
export function importSettings(): { uploadDir: string; maxBytes: number } {
  const config = loadConfig();
  return { uploadDir: path.join(config.dataDir, 'uploads'), maxBytes: config.importMaxBytes };
}

export function ensureUploadDir(): string {
  const { uploadDir } = importSettings();
  mkdirSync(uploadDir, { recursive: true });
  return uploadDir;
}

const delimiterNames: Record<Delimiter, 'comma' | 'semicolon' | 'tab'> = {
  ',': 'comma',
  ';': 'semicolon',
  '\t': 'tab',
};

function describeRow(row: ReviewRow | AggregateRow): Record<string, string> {
  const text = (v: string | number | boolean | null | undefined): string =>
    v === null || v === undefined ? '' : String(v);
  if ('reviewId' in row)
    return {
      review_id: row.reviewId,
      sku: row.sku,
      title: row.title,
      category: row.category,
      stars: text(row.stars),
      reviewed_at: row.reviewedAt.toISOString().replace('.000Z', 'Z'),
      helpful_yes: text(row.helpfulYes),
      helpful_no: text(row.helpfulNo),
      reviewer_id: text(row.reviewerId),
      reviewer_score: text(row.reviewerScore),
      verified: text(row.verified),
      text: row.text && row.text.length > 200 ? `${row.text.slice(0, 200)}…` : text(row.text),
    };
  const h = row.histogram;
  return {
    sku: row.sku,
    title: row.title,
    category: row.category,
    observed_on: row.observedOn,
    review_count: text(row.reviewCount),
    mean_stars: text(row.meanStars),
    stars_1: text(h?.[0]),
    stars_2: text(h?.[1]),
    stars_3: text(h?.[2]),
    stars_4: text(h?.[3]),
    stars_5: text(h?.[4]),
    newest_review_at: row.newestReviewAt ? row.newestReviewAt.toISOString() : '',
  };
}

/**
 * The first rows of a file as the import will read them, without writing anything. The parser reads the
 * file in a worker thread (a single 200 KB line costs it real CPU); only the check against the caller's
 * categories, which needs the database, runs here.
 */
export async function previewImport(
  filePath: string,
  kind: ImportKind,
  actor: Actor,
  fileName: string | null,
): Promise<ImportPreview> {
  const scope = await loadCategoryScope(actor.categoryIds);
  const read = await runInWorker<PreviewRead>({
    kind: 'preview',
    filePath,
    importKind: kind,
    records: previewRowCount + 1,
    maxBytes: importSettings().maxBytes,
    now: new Date().toISOString(),
  });
  const preview: ImportPreview = {
    kind,
    fileName,
    delimiter: null,
    header: [],
    rows: [],
    more: false,
    fileError: read.fileError,
    warnings: [],
  };
  for (const record of read.records) {
    if (preview.rows.length >= previewRowCount) {
      preview.more = true;
      break;
    }
    if ('error' in record) {
      preview.rows.push({ line: record.line, values: null, error: record.error });
      continue;
    }
    const category = checkCategory(scope, record.row.category);
    preview.rows.push(
      typeof category === 'string'
        ? {
            line: record.line,
            values: null,
            error: { line: record.line, column: 'category', reason: category },
          }
        : { line: record.line, values: describeRow(record.row), error: null },
    );
  }
  if (read.progress.header.length > 0) preview.delimiter = delimiterNames[read.progress.delimiter];
  preview.header = read.progress.header;
  preview.warnings = [...read.progress.warnings];
  return preview;
}

// ------------------------------------------------------------------ batches

function who(batch: ImportBatch & { user?: User | null }, tokenNames: Map<number, string>): string | null {
  if (batch.tokenId) return `API token ${tokenNames.get(batch.tokenId) ?? `#${batch.tokenId}`}`;
  if (batch.user) return batch.user.name;
  if (batch.source === 'demo') return 'Demo loader';
  return batch.actorEmail;
}

function toRecord(
  batch: ImportBatch & { user?: User | null },
  tokenNames: Map<number, string>,
): ImportBatchRecord {
  return {
    id: batch.id,
    kind: batch.kind,
    source: batch.source,
    mode: batch.mode,
    status: batch.status,
    fileName: batch.fileName,
    fileBytes: batch.fileBytes === null ? null : Number(batch.fileBytes),
    bytesDone: Number(batch.bytesDone),
    rowsRead: batch.rowsRead,
    rowsAccepted: batch.rowsAccepted,
    rowsRejected: batch.rowsRejected,
    rowsInserted: batch.rowsInserted,
    rowsUpdated: batch.rowsUpdated,
    errorMessage: batch.errorMessage,
    who: who(batch, tokenNames),
    createdAt: batch.createdAt.toISOString(),
    startedAt: batch.startedAt?.toISOString() ?? null,
    finishedAt: batch.finishedAt?.toISOString() ?? null,
  };
}

async function tokenNamesFor(batches: ImportBatch[]): Promise<Map<number, string>> {
  const ids = [...new Set(batches.map((b) => b.tokenId).filter((id): id is number => id !== null))];
  if (ids.length === 0) return new Map();
  const tokens = await ApiToken.findAll({ where: { id: ids }, attributes: ['id', 'name'] });
  return new Map(tokens.map((t) => [t.id, t.name]));
}

/** Admins and operations see every import; a category manager sees the imports they started. */
function visibleTo(actor: Actor): Record<string, unknown> {
  return actor.role === 'manager' ? { userId: actor.kind === 'user' ? actor.id : -1 } : {};
}

export async function listImports(actor: Actor, limit: number): Promise<ImportBatchRecord[]> {
  const batches = await ImportBatch.findAll({
    where: visibleTo(actor),
    include: [{ model: User, as: 'user', attributes: ['id', 'name'] }],
    order: [['id', 'DESC']],
    limit,
  });
  const names = await tokenNamesFor(batches);
  return batches.map((b) => toRecord(b, names));
}

async function findVisible(actor: Actor, id: number): Promise<ImportBatch> {
  const batch = await ImportBatch.findOne({
    where: { id, ...visibleTo(actor) },
    include: [{ model: User, as: 'user', attributes: ['id', 'name'] }],
  });
  if (!batch) throw AppError.notFound('The import');
  return batch;
}

export async function getImport(actor: Actor, id: number): Promise<ImportBatchRecord> {
  const batch = await findVisible(actor, id);
  return toRecord(batch, await tokenNamesFor([batch]));
}

/** The rejected rows of an import as CSV (line, column, reason, raw), safe to open in a spreadsheet. */
export async function importErrorsCsv(actor: Actor, id: number): Promise<{ csv: string; fileName: string }> {
  const batch = await findVisible(actor, id);
  const rows = await ImportRowError.findAll({
    where: { batchId: id },
    order: [
      ['line', 'ASC'],
      ['id', 'ASC'],
    ],
  });
  const csv = rejectedRowsCsv(
    rows.map((r) => ({
      line: r.line,
      ...(r.columnName ? { column: r.columnName } : {}),
      reason: r.reason,
      ...(r.raw !== null ? { raw: r.raw } : {}),
    })),
  );
  // Only the first rejected rows are kept; the file's name says how many of how many it holds.
  const capped = rows.length < batch.rowsRejected;
  const fileName = capped
    ? `ballast-import-${id}-rejected-rows-first-${rows.length}-of-${batch.rowsRejected}.csv`
    : `ballast-import-${id}-rejected-rows.csv`;
  return { csv, fileName };
}

// ------------------------------------------------------------------ uploads in the background

/** The categories an import may write, decided when it runs (ownership may have changed since upload). */
async function scopeOf(batch: ImportBatch): Promise<number[] | null> {
  if (batch.tokenId) {
    const token = await ApiToken.findByPk(batch.tokenId);
    if (!token || token.revokedAt) return [];
    return token.role === 'manager' ? (token.categoryIds ?? []) : token.categoryIds;
  }
  if (batch.userId) {
    const user = await User.findByPk(batch.userId, { attributes: ['id', 'role'] });
    if (!user) return [];
    if (user.role !== 'manager') return null;
    const owned = await CategoryOwner.findAll({ where: { userId: user.id }, attributes: ['categoryId'] });
    return owned.map((o) => o.categoryId);
  }
  return null;
}

let queue: Promise<void> = Promise.resolve();
let pending = 0;
/** Imports queued or running in this process. */
const inThisProcess = new Set<number>();

/** Imports run one at a time in the server process, in the order they were started. */
function enqueue(batchId: number): void {
  pending++;
  inThisProcess.add(batchId);
  keepLeases(() => pending > 0);
  queue = queue
    .then(() => runUploadBatch(batchId))
    .catch((err: unknown) => logger.error({ err, batchId }, 'import failed'))
    .finally(() => {
      pending--;
      inThisProcess.delete(batchId);
    });
}

/** Resolves once every queued import has finished (for the demo reset and tests). */
export async function importsIdle(): Promise<void> {
  while (pending > 0) await queue;
}

async function runUploadBatch(batchId: number): Promise<void> {
  // Another server may have taken the import over while this one was busy (its lease ran out).
  if (!(await claimImport(batchId))) return;
  const batch = await ImportBatch.findByPk(batchId);
  if (!batch || (batch.status !== 'queued' && batch.status !== 'running')) return;
  const file = batch.filePath;
  if (!file) return;
  const resumed = batch.status === 'running';
  await batch.update({ status: 'running', startedAt: batch.startedAt ?? new Date() });
  const resumeFrom: Counters | undefined =
    resumed && batch.mode === 'valid_rows'
      ? {
          rowsRead: batch.rowsRead,
          rowsAccepted: batch.rowsAccepted,
          rowsRejected: batch.rowsRejected,
          rowsInserted: batch.rowsInserted,
          rowsUpdated: batch.rowsUpdated,
          bytesDone: Number(batch.bytesDone),
        }
      : undefined;
  if (resumed && batch.mode === 'all_or_nothing') await ImportRowError.destroy({ where: { batchId } });
  try {
    let source: ReadStream | undefined;
    const parse = () => {
      source = createReadStream(file);
      return parseImport(source, batch.kind, { now: batch.createdAt, maxBytes: importSettings().maxBytes });
    };
    await writeWithRetries(parse, {
      batchId,
      kind: batch.kind,
      mode: batch.mode,
      scope: await loadCategoryScope(await scopeOf(batch)),
      ...(resumeFrom ? { resumeFrom } : {}),
      bytesRead: () => source?.bytesRead ?? 0,
    });
  } catch (err) {
    // The writer has already marked the batch failed with the reason the person can act on.
    if (err instanceof ImportConflictError) return;
    logger.error({ err, batchId }, 'import stopped');
    await ImportBatch.update(
      {
        status: 'failed',
        errorMessage:
          batch.mode === 'all_or_nothing'
            ? 'The import stopped because of a problem on our side; nothing was imported. Try again.'
            : 'The import stopped because of a problem on our side; the rows counted as accepted were ' +
              'imported. Import the file again to finish (rows already imported are not duplicated).',
        finishedAt: new Date(),
      },
      { where: { id: batchId } },
    );
  } finally {
    await rm(file, { force: true });
    await releaseImport(batchId);
  }
}

/**
 * Starts an import of an uploaded file that waits under the data directory. Refuses at once a file that
 * cannot be read at all (empty, binary, not UTF-8, wrong header), so the person sees why immediately.
 */
export async function startUpload(
  actor: Actor,
  upload: { path: string; originalName: string; size: number },
  kind: ImportKind,
  mode: ImportMode,
): Promise<ImportBatchRecord> {
  const head = await previewImport(upload.path, kind, actor, upload.originalName);
  if (head.fileError) {
    await rm(upload.path, { force: true });
    throw new AppError('bad_request', head.fileError.message, 400, { code: head.fileError.code });
  }
  const batch = await ImportBatch.create({
    kind,
    source: 'upload',
    mode,
    status: 'queued',
    fileName: upload.originalName.slice(0, 255),
    filePath: upload.path,
    fileBytes: upload.size,
    fileSha256: null,
    errorMessage: null,
    userId: actor.kind === 'user' ? actor.id : null,
    tokenId: actor.kind === 'token' ? actor.id : null,
    actorEmail: actor.email,
    startedAt: null,
    finishedAt: null,
    ...newLease(),
  });
  enqueue(batch.id);
  return getImport(actor, batch.id);
}

/**
 * Imports left queued or running by a stopped server are picked up again when their upload is still on
 * disk ("valid rows" continue after the last committed chunk, "all or nothing" start over, since their
 * transaction was rolled back); without the file they are marked failed with the reason. An import whose
 * server is still alive (its lease is current) is left to that server. Runs at start and every few minutes.
 */
export async function resumeImports(log: (line: string) => void, owner = importWorkerId): Promise<number> {
  const left = await ImportBatch.findAll({
    where: { status: { [Op.in]: ['queued', 'running'] } },
    order: [['id', 'ASC']],
  });
  let resumed = 0;
  for (const batch of left) {
    if (inThisProcess.has(batch.id) || !(await claimImport(batch.id, owner))) continue;
    const present = batch.filePath
      ? await stat(batch.filePath).then(
          () => true,
          () => false,
        )
      : false;
    if (batch.source === 'upload' && present) {
      enqueue(batch.id);
      resumed++;
      continue;
    }
    await batch.update({
      leaseOwner: null,
      leaseUntil: null,
      status: 'failed',
      finishedAt: new Date(),
      errorMessage:
        'Ballast stopped while this import was running and its file is no longer there. ' +
        (batch.mode === 'valid_rows' && batch.rowsAccepted > 0
          ? `The ${batch.rowsAccepted} rows counted as accepted were imported; import the file again to finish.`
          : 'Nothing was imported; import the file again.'),
    });
  }
  if (resumed > 0) log(`Resuming ${resumed} import(s) interrupted by the last stop.`);
  return resumed;
}

const sweepEveryMs = 2 * 60_000;

/**
 * Resumes interrupted imports now, then looks again every two minutes, so that an import whose server
 * stopped for good is taken up (or failed with the reason) by a server that is still running.
 */
export async function watchImports(log: (line: string) => void): Promise<() => void> {
  await resumeImports(log);
  const timer = setInterval(() => {
    resumeImports(log).catch((err: unknown) => logger.warn({ err }, 'import sweep failed'));
  }, sweepEveryMs);
  timer.unref();
  return () => clearInterval(timer);
}

// ------------------------------------------------------------------ ingest API and demo

function jsonExcerpt(value: unknown): string {
  const text = JSON.stringify(value) ?? '';
  return text.length > 1_000 ? `${text.slice(0, 1_000)}…` : text;
}

/** The JSON rows of an ingest request, checked one by one with the same rules as a CSV file. */
export function validateJsonRows<K extends ImportKind>(
  kind: K,
  rows: unknown[],
  now: Date,
): ParsedRecord<K>[] {
  const clock = () => now;
  const schema = kind === 'reviews' ? createReviewJsonRowSchema(clock) : createAggregateJsonRowSchema(clock);
  const rules = new CrossRowRules(kind);
  return rows.map((input, index): ParsedRecord<K> => {
    const line = index + 1;
    const problems: { column: string | undefined; message: string }[] = [];
    const result = schema.safeParse(input);
    const cells = (input && typeof input === 'object' ? input : {}) as Record<string, unknown>;
    const category = typeof cells.category === 'string' ? keyOf(cells.category) : '';
    const sku = typeof cells.sku === 'string' ? keyOf(cells.sku) : '';
    const titleCell = typeof cells.title === 'string' ? cells.title.trim().normalize('NFC') : undefined;
    const title = sku
      ? rules.resolveTitle(category, sku, titleCell && titleFits(titleCell) ? titleCell : undefined)
      : undefined;
    problems.push(...nulProblems(cells));
    if (!result.success) {
      for (const issue of result.error.issues)
        problems.push({
          column: typeof issue.path[0] === 'string' ? issue.path[0] : undefined,
          message: issue.message,
        });
    } else {
      if (title === undefined) problems.push({ column: 'title', message: titleMissingReason });
      const first = rules.duplicateOf(rules.duplicateKey(result.data), line);
      if (first !== undefined)
        problems.unshift({
          column: kind === 'reviews' ? 'reviewId' : 'observedOn',
          message: rules.duplicateReason(first, true),
        });
    }
    if (problems.length > 0 || !result.success || title === undefined)
      return {
        line,
        error: {
          line,
          ...(problems[0]?.column ? { column: problems[0].column } : {}),
          reason: problems.map((p) => p.message).join('; '),
          raw: jsonExcerpt(input),
        },
      };
    return { line, row: { ...result.data, title } } as ParsedRecord<K>;
  });
}

/** The ingest API: validate, write and answer with the counts and every row error, in one request. */
export async function ingestRows(
  actor: Actor,
  kind: ImportKind,
  mode: ImportMode,
  rows: unknown[],
): Promise<IngestResult> {
  const records = validateJsonRows(kind, rows, new Date());
  const batch = await ImportBatch.create({
    kind,
    source: 'api',
    mode,
    status: 'running',
    fileName: null,
    filePath: null,
    fileBytes: null,
    fileSha256: null,
    errorMessage: null,
    userId: actor.kind === 'user' ? actor.id : null,
    tokenId: actor.kind === 'token' ? actor.id : null,
    actorEmail: actor.email,
    startedAt: new Date(),
    finishedAt: null,
  });
  const outcome = await runInline(batch.id, kind, mode, records, actor.categoryIds);
  const errors: RowError[] = outcome.errors;
  return {
    batchId: batch.id,
    status: outcome.status,
    ...outcome.counters,
    errors,
    errorMessage: outcome.errorMessage,
  } as IngestResult;
}

async function runInline<K extends ImportKind>(
  batchId: number,
  kind: K,
  mode: ImportMode,
  records: ParsedRecord<K>[],
  allowed: number[] | null,
): Promise<WriteOutcome> {
  try {
    return await writeWithRetries(() => fromArray(records), {
      batchId,
      kind,
      mode,
      scope: await loadCategoryScope(allowed),
    });
  } catch (err) {
    if (err instanceof ImportConflictError) throw err;
    await ImportBatch.update(
      {
        status: 'failed',
        errorMessage: 'The import stopped because of a problem on our side.',
        finishedAt: new Date(),
      },
      { where: { id: batchId } },
    );
    throw err;
  }
}

/**
 * Imports a file on disk right away, through the same parser and writer as an upload (for scripts and the
 * bench). The file is left in place.
 */
export async function importFileNow(
  filePath: string,
  kind: ImportKind,
  mode: ImportMode,
): Promise<WriteOutcome> {
  const { size } = await stat(filePath);
  const batch = await ImportBatch.create({
    kind,
    source: 'command',
    mode,
    status: 'running',
    fileName: path.basename(filePath).slice(0, 255),
    filePath: null,
    fileBytes: size,
    fileSha256: null,
    errorMessage: null,
    userId: null,
    tokenId: null,
    actorEmail: null,
    startedAt: new Date(),
    finishedAt: null,
  });
  const source = createReadStream(filePath);
  return writeRecords(parseImport(source, kind, { now: new Date(), maxBytes: Math.max(size, 1) }), {
    batchId: batch.id,
    kind,
    mode,
    scope: await loadCategoryScope(null),
    bytesRead: () => source.bytesRead,
  });
}

/** Loads already-validated review rows (the demo scenario) through the same writer as every import. */
export async function importReviewRows(
  rows: ReviewRow[],
  source: 'demo' | 'command',
  label: string,
): Promise<WriteOutcome['counters']> {
  const batch = await ImportBatch.create({
    kind: 'reviews',
    source,
    mode: 'valid_rows',
    status: 'running',
    fileName: label,
    filePath: null,
    fileBytes: null,
    fileSha256: null,
    errorMessage: null,
    userId: null,
    tokenId: null,
    actorEmail: null,
    startedAt: new Date(),
    finishedAt: null,
  });
  const outcome = await runInline(
    batch.id,
    'reviews',
    'valid_rows',
    rows.map((row, i) => ({ line: i + 1, row })),
    null,
  );
  return outcome.status === 'succeeded' ? outcome.counters : zeroCounters();
}
