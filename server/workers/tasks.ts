import { createReadStream } from 'node:fs';
import { Tinypool } from 'tinypool';
import {
  calibrate,
  scoreCategory,
  scoreRequest,
  scoreWithRankIntervals,
  ScoringInputError,
  type ItemInput,
  type PreviousRankingEntry,
  type RankIntervalOptions,
  type RankIntervalResult,
  type ScoreResult,
  type ScoringSettings,
} from '../../shared/scoring';
import { SCORE_PAGE_MAX, scoreRequestSchema, type ScoreRequest } from '../../shared/schemas/score.schema';
import type { CategoryDigestData, PaperSize, PortfolioDigestData } from '../../shared/schemas/digests.schema';
import type { ImportKind } from '../../shared/schemas/import.schema';
import { renderCategoryDigest } from '../../templates/pdf/category-digest';
import { renderPortfolioDigest } from '../../templates/pdf/portfolio-digest';
import {
  ImportFileError,
  parseImport,
  type Delimiter,
  type HeaderMapping,
  type ParsedRecord,
} from '../modules/imports/import-parser';
import { parseJsonBytes, type JsonBodyFailure } from './json-body';

export interface CalibrateTask {
  kind: 'calibrate';
  items: ItemInput[];
  observed: string[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

export interface ScoreTask {
  kind: 'score';
  /** The request body as it arrived (null: none); parsed and checked here, off the event loop. */
  body: Uint8Array | null;
  /** The caller's clock reading, so a worker never decides "now" itself. */
  now: string;
}

export type ScorePage = ReturnType<typeof scoreRequest> & {
  page: { offset: number; limit: number; total: number };
};

/**
 * Only the asked-for page leaves the worker, so the event loop never holds 200,000 item results; the
 * command line uses the same rule, so it prints the same JSON as the API.
 */
export function scorePage(request: ScoreRequest, now: Date): ScorePage {
  const result = scoreRequest(request, now);
  const offset = request.offset ?? 0;
  const limit = request.limit ?? SCORE_PAGE_MAX;
  return {
    ...result,
    items: result.items.slice(offset, offset + limit),
    page: { offset, limit, total: result.items.length },
  };
}

export type DigestTask =
  | { kind: 'digest'; digest: 'category'; data: CategoryDigestData; paper: PaperSize }
  | { kind: 'digest'; digest: 'portfolio'; data: PortfolioDigestData; paper: PaperSize };

/** The alert check's view of a category: the engine's standing of every item as of an instant. */
export interface AlertStateTask {
  kind: 'alert-state';
  items: ItemInput[];
  settings: Partial<ScoringSettings>;
  asOf: string;
}

export type AlertItemState = {
  sku: string;
  title: string | null;
  rank: number;
  n: number;
  smoothed: number;
  cluster: boolean | null;
  clusterReason: string | null;
  phrases: { phrase: string; count: number }[];
  stale: boolean | null;
  staleReason: string | null;
  thin: boolean;
};

export function alertState(task: AlertStateTask): AlertItemState[] {
  const result = scoreCategory(task.items, task.settings, { asOf: task.asOf, previous: null });
  return result.items.map((r) => ({
    sku: r.sku,
    title: r.title,
    rank: r.smoothedRank,
    n: r.n,
    smoothed: r.smoothed,
    cluster: r.negativeCluster,
    clusterReason: r.clusterReason,
    phrases: r.recurringPhrases,
    stale: r.stale,
    staleReason: r.staleReason,
    thin: r.thin,
  }));
}

/** A snapshot's scoring and rank sampling, off the event loop that runs the scheduler and the API. */
export interface SnapshotScoreTask {
  kind: 'snapshot-score';
  items: ItemInput[];
  settings: Partial<ScoringSettings>;
  asOf: string;
  previous: PreviousRankingEntry[] | null;
  ranks: RankIntervalOptions;
}

export type SnapshotScore = { result: ScoreResult; intervals: RankIntervalResult };

/** The PDF's bytes (a few hundred KB, copied back to the event loop) and its page count. */
export type RenderedDigest = { pdf: Uint8Array; pages: number };

async function renderDigest(task: DigestTask) {
  const { pdf, pages } =
    task.digest === 'category'
      ? await renderCategoryDigest(task.data, task.paper)
      : await renderPortfolioDigest(task.data, task.paper);
  return { pdf, pages } satisfies RenderedDigest;
}

export interface PreviewTask {
  kind: 'preview';
  filePath: string;
  importKind: ImportKind;
  /** Records to read at most: the preview's rows and one more, to tell whether there are more. */
  records: number;
  maxBytes: number;
  now: string;
}

export type PreviewRead = {
  records: ParsedRecord<ImportKind>[];
  progress: { delimiter: Delimiter; header: HeaderMapping[]; warnings: string[] };
  fileError: { code: string; message: string; line: number | null } | null;
};

/** The first records of an uploaded file, read by the import parser itself. */
async function readPreview(task: PreviewTask): Promise<PreviewRead> {
  const parse = parseImport(createReadStream(task.filePath), task.importKind, {
    now: new Date(task.now),
    maxBytes: task.maxBytes,
  });
  const records: ParsedRecord<ImportKind>[] = [];
  let fileError: PreviewRead['fileError'] = null;
  try {
    for await (const record of parse) {
      records.push(record);
      if (records.length >= task.records) break;
    }
  } catch (error) {
    if (!(error instanceof ImportFileError)) throw error;
    fileError = { code: error.code, message: error.message, line: error.line ?? null };
  }
  return { records, progress: parse.progress, fileError };
}

export type WorkerTask =
  CalibrateTask | ScoreTask | DigestTask | PreviewTask | SnapshotScoreTask | AlertStateTask;

/**
 * The answer's JSON as bytes moved (not copied) to the event loop, which sends them as they are; an input
 * error crosses the thread boundary as plain data and the service turns it back into a 400.
 */
export type ScoreOutcome =
  | Uint8Array
  | JsonBodyFailure
  | { ok: false; kind: 'scoring'; path: string; reason: string; message: string };

function scoreBody(task: ScoreTask): ScoreOutcome {
  const read = parseJsonBytes(scoreRequestSchema, task.body);
  if (!read.ok) return read;
  try {
    const page = scorePage(read.value, new Date(task.now));
    return Tinypool.move(new TextEncoder().encode(JSON.stringify(page))) as Uint8Array;
  } catch (err) {
    if (err instanceof ScoringInputError)
      return { ok: false, kind: 'scoring', path: err.path, reason: err.reason, message: err.message };
    throw err;
  }
}

/** Runs in a worker thread: the CPU-heavy part only, plain data in and out. */
export default function runTask(task: WorkerTask) {
  switch (task.kind) {
    case 'snapshot-score':
      return scoreWithRankIntervals(
        task.items,
        task.settings,
        { asOf: task.asOf, previous: task.previous },
        task.ranks,
      ) satisfies SnapshotScore;
    case 'calibrate':
      return calibrate(task.items, task.observed, task.settings, { asOf: task.asOf, unexplainedCount: 50 });
    case 'alert-state':
      return alertState(task);
    case 'score':
      return scoreBody(task);
    case 'digest':
      return renderDigest(task);
    case 'preview':
      return readPreview(task);
  }
}
