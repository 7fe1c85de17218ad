import { Readable } from 'node:stream';
import { parse } from 'csv-parse';
import type { Info } from 'csv-parse';
import {
  CrossRowRules,
  columnsByKind,
  fastReviewCsvRow,
  createAggregateCsvRowSchema,
  createReviewCsvRowSchema,
  cutGraphemes,
  histogramColumns,
  importLimits,
  nulProblems,
  titleFits,
  titleMissingReason,
} from '../../../shared/schemas/import.schema';
import type {
  AggregateRow,
  AggregateRowDraft,
  ImportKind,
  ReviewRow,
  ReviewRowDraft,
  RowError,
} from '../../../shared/schemas/import.schema';

export const defaultMaxBytes = 50 * 1024 * 1024;
/** Beyond this a record is not a review but a broken file (e.g. a stray quote swallowing rows). */
const maxRecordChars = 5_000_000;
/** Error messages and rejected rows quote at most this much of what was sent. */
const rawExcerptChars = 200;
/** A header of Ballast's columns is a few hundred characters; a first line longer than this is not one. */
const headerSniffChars = 64 * 1024;
/** Bytes looked at to tell the encoding (UTF-16 without a byte order mark shows as every other byte 0). */
const encodingSniffBytes = 512;

export type ImportFileErrorCode =
  | 'empty_file'
  | 'binary_file'
  | 'not_utf8'
  | 'too_large'
  | 'missing_column'
  | 'unknown_column'
  | 'duplicate_column'
  | 'malformed_csv';

/** The whole file is refused; nothing from it may be stored, even rows already yielded. */
export class ImportFileError extends Error {
  override readonly name = 'ImportFileError';
  constructor(
    readonly code: ImportFileErrorCode,
    message: string,
    readonly line?: number,
  ) {
    super(message);
  }
}

export type Delimiter = ',' | ';' | '\t';

export interface HeaderMapping {
  /** 1-based position in the header. */
  position: number;
  /** The header cell as written. */
  header: string;
  /** The Ballast column it maps to; null for an ignored unnamed trailing column. */
  column: string | null;
}

export interface ImportSummary {
  kind: ImportKind;
  rowsRead: number;
  rowsValid: number;
  rowsInvalid: number;
  delimiter: Delimiter;
  header: HeaderMapping[];
  bytes: number;
  /** Lines with nothing but delimiters or whitespace; skipped, not counted as rows. */
  blankLines: number;
  textsTruncated: number;
  warnings: string[];
}

export type RowOf<K extends ImportKind> = K extends 'reviews' ? ReviewRow : AggregateRow;
export type ParsedRecord<K extends ImportKind> =
  { line: number; row: RowOf<K> } | { line: number; error: RowError };

export interface ImportParseOptions {
  now: Date;
  maxBytes?: number;
}

const magicNumbers: { bytes: number[]; what: string; code?: ImportFileErrorCode }[] = [
  { bytes: [0x50, 0x4b, 0x03, 0x04], what: 'a zip archive or an Excel workbook (.xlsx)' },
  { bytes: [0xd0, 0xcf, 0x11, 0xe0], what: 'an old Excel workbook (.xls)' },
  { bytes: [0x25, 0x50, 0x44, 0x46, 0x2d], what: 'a PDF document' },
  { bytes: [0x1f, 0x8b], what: 'a gzip archive' },
];

type Encoding = 'utf-8' | 'utf-16le' | 'utf-16be';
const encodingNames: Record<Encoding, string> = {
  'utf-8': 'UTF-8',
  'utf-16le': 'UTF-16 (little-endian)',
  'utf-16be': 'UTF-16 (big-endian)',
};

/**
 * UTF-8 unless a UTF-16 byte order mark says otherwise, or the text is mostly ASCII written as UTF-16
 * without one (as some exports do): then one byte of nearly every pair is 0, always on the same side.
 */
export function sniffEncoding(head: Buffer): Encoding {
  if (head[0] === 0xff && head[1] === 0xfe) return 'utf-16le';
  if (head[0] === 0xfe && head[1] === 0xff) return 'utf-16be';
  const pairs = Math.floor(Math.min(head.length, encodingSniffBytes) / 2);
  if (pairs < 2) return 'utf-8';
  let zeroEven = 0;
  let zeroOdd = 0;
  for (let i = 0; i < pairs; i++) {
    if (head[2 * i] === 0) zeroEven++;
    if (head[2 * i + 1] === 0) zeroOdd++;
  }
  if (zeroOdd >= pairs * 0.6 && zeroEven === 0) return 'utf-16le';
  if (zeroEven >= pairs * 0.6 && zeroOdd === 0) return 'utf-16be';
  return 'utf-8';
}

const saveAsCsv = 'Save it as "CSV UTF-8 (comma delimited)" and upload that file.';

function sniffMagic(head: Buffer): void {
  for (const magic of magicNumbers) {
    if (head.length >= magic.bytes.length && magic.bytes.every((b, i) => head[i] === b))
      throw new ImportFileError(
        magic.code ?? 'binary_file',
        `This file is ${magic.what}, not CSV. ${saveAsCsv}`,
      );
  }
}

/**
 * Bytes to text: enforces the size limit, refuses binary formats and text that is not valid in its encoding
 * (UTF-8, or UTF-16 told by its byte order mark or its zero bytes), drops a BOM and turns every line end
 * (CRLF, LF, or a bare CR as older spreadsheet programs write) into LF, so that line numbers count as an
 * editor shows them. A CR inside a quoted value becomes LF too.
 */
async function* decodeText(source: Readable, maxBytes: number, counters: { bytes: number }) {
  let decoder: TextDecoder | null = null;
  let encoding: Encoding = 'utf-8';
  let head: Buffer | null = Buffer.alloc(0);
  let lines = 1;
  let pendingCr = false;
  const decode = (bytes: Buffer | undefined): string => {
    try {
      return bytes ? decoder!.decode(bytes, { stream: true }) : decoder!.decode();
    } catch {
      // Find the line of the first bad byte with a forgiving decoder, which marks it U+FFFD.
      const loose = bytes ? new TextDecoder(encoding).decode(bytes).replace(/\r\n?/g, '\n') : '';
      const bad = loose.indexOf('\uFFFD');
      if (bad > 0)
        for (let i = loose.indexOf('\n'); i !== -1 && i < bad; i = loose.indexOf('\n', i + 1)) lines++;
      throw new ImportFileError(
        'not_utf8',
        encoding === 'utf-8'
          ? `The file is not valid UTF-8 (the first bad byte is on or after line ${lines}); it was probably saved ` +
              `in a legacy encoding such as Latin-1 or Windows-1252. ${saveAsCsv}`
          : `The file looks like ${encodingNames[encoding]} text but is not valid ${encodingNames[encoding]} ` +
              `on or after line ${lines}. ${saveAsCsv}`,
        lines,
      );
    }
  };
  const emit = (text: string): string => {
    let out = pendingCr ? '\r' + text : text;
    pendingCr = out.endsWith('\r');
    if (pendingCr) out = out.slice(0, -1);
    out = out.replace(/\r\n?/g, '\n');
    for (let i = out.indexOf('\n'); i !== -1; i = out.indexOf('\n', i + 1)) lines++;
    return out;
  };
  const start = (bytes: Buffer): void => {
    sniffMagic(bytes);
    encoding = sniffEncoding(bytes);
    decoder = new TextDecoder(encoding, { fatal: true, ignoreBOM: false });
  };

  for await (const chunk of source) {
    const bytes: Buffer = typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer);
    counters.bytes += bytes.length;
    if (counters.bytes > maxBytes)
      throw new ImportFileError(
        'too_large',
        `The file is larger than the limit of ${formatBytes(maxBytes)}. Split it into smaller files.`,
      );
    if (head) {
      head = Buffer.concat([head, bytes]);
      if (head.length < encodingSniffBytes) continue;
      const pending = head;
      head = null;
      start(pending);
      const text = emit(decode(pending));
      if (text) yield text;
    } else {
      const text = emit(decode(bytes));
      if (text) yield text;
    }
  }
  if (head) {
    if (head.length === 0) return;
    start(head);
    const text = emit(decode(head));
    if (text) yield text;
  }
  const tail = emit(decode(undefined)) + (pendingCr ? '\n' : '');
  if (tail) yield tail;
}

function formatBytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(0)} MB` : `${bytes} bytes`;
}

/** The delimiter that splits the header line most often, outside quotes; ties prefer comma. */
export function sniffDelimiter(headerLine: string): Delimiter {
  const counts: Record<Delimiter, number> = { ',': 0, ';': 0, '\t': 0 };
  let quoted = false;
  for (const ch of headerLine) {
    if (ch === '"') quoted = !quoted;
    else if (!quoted && (ch === ',' || ch === ';' || ch === '\t')) counts[ch]++;
  }
  let best: Delimiter = ',';
  for (const d of [';', '\t'] as const) if (counts[d] > counts[best]) best = d;
  return best;
}

const delimiterNames: Record<Delimiter, string> = { ',': 'comma', ';': 'semicolon', '\t': 'tab' };

/** Characters that take no space on screen (zero-width space, BOM, word joiner, direction marks…). */
const invisible = /[\p{Cf}]/gu;

function normaliseHeader(cell: string): string {
  return cell.replace(invisible, '').trim().toLowerCase();
}

function describeInvisible(cell: string): string | null {
  const found = [...new Set(cell.match(invisible) ?? [])];
  if (found.length === 0) return null;
  return found.map((ch) => 'U+' + ch.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')).join(', ');
}

function shortText(value: string, max = 40): string {
  // Cut by graphemes: half an emoji (a lone surrogate) could not even be stored.
  if (value.length <= max) return value;
  const cut = cutGraphemes(value.slice(0, max * 16), max).replace(/[\uD800-\uDBFF]$/, '');
  return cut.length < value.length ? cut + '…' : cut;
}

function mapHeader(kind: ImportKind, cells: string[]): { mapping: HeaderMapping[]; warnings: string[] } {
  const known = columnsByKind[kind];
  const otherKind: ImportKind = kind === 'reviews' ? 'aggregates' : 'reviews';
  const lastNamed = cells.reduce((last, cell, i) => (cell.trim() === '' ? last : i), -1);
  const mapping: HeaderMapping[] = [];
  const warnings: string[] = [];
  const seen = new Map<string, number>();
  cells.forEach((cell, i) => {
    const name = normaliseHeader(cell);
    const position = i + 1;
    if (name === '') {
      if (i > lastNamed) {
        mapping.push({ position, header: cell, column: null });
        return;
      }
      throw new ImportFileError('unknown_column', `Column ${position} of the header has no name.`, 1);
    }
    const hidden = describeInvisible(cell);
    if (!known.some((c) => c.name === name)) {
      const hint = columnsByKind[otherKind].some((c) => c.name === name)
        ? ` It belongs to the ${otherKind} format: is this an ${otherKind} file?`
        : '';
      throw new ImportFileError(
        'unknown_column',
        `Unknown column "${shortText(name)}" (column ${position}` +
          `${hidden ? `, which also holds the invisible character ${hidden}` : ''}).${hint} ` +
          `The ${kind} format has the columns: ` +
          `${known.map((c) => c.name).join(', ')}.`,
        1,
      );
    }
    const earlier = seen.get(name);
    if (earlier !== undefined)
      throw new ImportFileError(
        'duplicate_column',
        `Column "${name}" appears twice in the header (columns ${earlier} and ${position}).`,
        1,
      );
    seen.set(name, position);
    if (hidden)
      warnings.push(
        `Column ${position} is "${name}" with the invisible character ${hidden}; it was read as ${name}.`,
      );
    mapping.push({ position, header: cell, column: name });
  });
  const missing = known.filter((c) => c.required && !seen.has(c.name)).map((c) => c.name);
  if (missing.length > 0)
    throw new ImportFileError(
      'missing_column',
      `The header lacks the required column${missing.length > 1 ? 's' : ''} ${missing.join(', ')}.`,
      1,
    );
  if (kind === 'aggregates') {
    const present = histogramColumns.filter((c) => seen.has(c));
    if (present.length > 0 && present.length < histogramColumns.length)
      throw new ImportFileError(
        'missing_column',
        `The star counts need all of stars_1..stars_5; missing ${histogramColumns.filter((c) => !seen.has(c)).join(', ')}.`,
        1,
      );
  }
  const ignored = mapping.filter((m) => m.column === null).length;
  if (ignored > 0) warnings.push(`${ignored} unnamed column(s) at the end of the header were ignored.`);
  return { mapping, warnings };
}

function excerpt(raw: string): string {
  const text = raw.endsWith('\n') ? raw.slice(0, -1) : raw;
  // NUL is never stored, not even in the copy of a rejected row; U+2400 shows where it was.
  return shortText(text.replace(/\0/g, '\u2400'), rawExcerptChars);
}

function showValue(value: string | undefined): string {
  if (value === undefined || value.trim() === '') return '';
  const shown = shortText(value);
  return ` (got "${shown}")`;
}

function countNewlines(text: string): number {
  let n = 0;
  for (let i = text.indexOf('\n'); i !== -1; i = text.indexOf('\n', i + 1)) n++;
  return n;
}

type CsvRecord = { record: string[]; raw: string; info: Info };

/**
 * Reads a Ballast import CSV as a stream. Iterate it for `{ line, row }` and `{ line, error }` records;
 * `summary` is available once iteration has finished. A thrown `ImportFileError` refuses the whole file,
 * including rows already yielded (the caller imports in one transaction).
 *
 * Memory grows only with the number of distinct review ids (duplicate detection) and items (titles).
 */
export class ImportParse<K extends ImportKind> implements AsyncIterable<ParsedRecord<K>> {
  private result: ImportSummary | null = null;
  private started = false;
  private delimiter: Delimiter = ',';
  private headerRead: HeaderMapping[] = [];
  private readonly clock = (): Date => this.options.now;
  private warningsSoFar: string[] = [];

  constructor(
    private readonly source: Readable,
    readonly kind: K,
    private readonly options: ImportParseOptions,
  ) {}

  /** What has been read so far, for a caller (the preview) that stops before the end. */
  get progress(): { delimiter: Delimiter; header: HeaderMapping[]; warnings: string[] } {
    return { delimiter: this.delimiter, header: this.headerRead, warnings: this.warningsSoFar };
  }

  get summary(): ImportSummary {
    if (!this.result) throw new Error('The import summary is available once the rows have all been read');
    return this.result;
  }

  [Symbol.asyncIterator](): AsyncIterator<ParsedRecord<K>> {
    if (this.started) throw new Error('An import can be read only once');
    this.started = true;
    return this.run();
  }

  private async *run(): AsyncGenerator<ParsedRecord<K>> {
    const counters = { bytes: 0 };
    const text = decodeText(this.source, this.options.maxBytes ?? defaultMaxBytes, counters);

    // Read ahead to the first non-blank line so the delimiter is known before csv-parse starts.
    // Each chunk is scanned once, so a first line of any length costs time linear in it.
    let head = '';
    let headerLine: string | null = null;
    let lineStart = 0;
    for (;;) {
      for (let nl = head.indexOf('\n', lineStart); nl !== -1; nl = head.indexOf('\n', lineStart)) {
        const candidate = head.slice(lineStart, nl);
        lineStart = nl + 1;
        if (candidate.trim() !== '') {
          headerLine = candidate;
          break;
        }
      }
      if (headerLine !== null || head.length - lineStart > headerSniffChars) break;
      const next = await text.next();
      if (next.done) break;
      head += next.value;
    }
    if (headerLine === null && head.length - lineStart > headerSniffChars)
      throw new ImportFileError(
        'malformed_csv',
        `The first line is longer than ${headerSniffChars.toLocaleString('en')} characters, so it cannot be ` +
          `a header of Ballast columns. Is this a CSV file? It begins "${shortText(head.slice(lineStart).trim())}".`,
        1,
      );
    if (headerLine === null) headerLine = head.slice(lineStart);
    if (head.trim() === '')
      throw new ImportFileError('empty_file', 'The file is empty: it has no header and no rows.');
    const delimiter = sniffDelimiter(headerLine);
    this.delimiter = delimiter;

    // The end line of the last record csv-parse finished, even if this loop has not taken it yet.
    let parsedEndLine = 0;
    const parser = parse({
      on_record: (record, context) => {
        parsedEndLine = context.lines;
        return record;
      },
      delimiter,
      record_delimiter: '\n',
      info: true,
      raw: true,
      relax_column_count: true,
      relax_quotes: true,
      skip_records_with_error: false,
      max_record_size: maxRecordChars,
    });
    async function* feed() {
      yield head;
      for (;;) {
        const next = await text.next();
        if (next.done) return;
        yield next.value;
      }
    }
    const input = Readable.from(feed(), { objectMode: false });
    input.on('error', (error) => parser.destroy(error));
    input.pipe(parser);

    const clock = () => this.options.now;
    const schema =
      this.kind === 'reviews' ? createReviewCsvRowSchema(clock) : createAggregateCsvRowSchema(clock);
    const rules = new CrossRowRules(this.kind);
    const summary: ImportSummary = {
      kind: this.kind,
      rowsRead: 0,
      rowsValid: 0,
      rowsInvalid: 0,
      delimiter,
      header: [],
      bytes: 0,
      blankLines: 0,
      textsTruncated: 0,
      warnings: [],
    };
    let header: HeaderMapping[] | null = null;
    let textIndex = -1;

    try {
      for await (const { record, raw, info } of parser as AsyncIterable<CsvRecord>) {
        const endLine = info.lines;
        const line = endLine - (countNewlines(raw) - (raw.endsWith('\n') ? 1 : 0));
        if (record.every((cell) => cell.trim() === '')) {
          if (header) summary.blankLines++;
          continue;
        }
        if (!header) {
          if (line !== 1)
            summary.warnings.push(`The header is on line ${line}; blank lines above it were skipped.`);
          const mapped = mapHeader(this.kind, record);
          header = mapped.mapping;
          summary.header = header;
          this.headerRead = header;
          this.warningsSoFar = summary.warnings;
          summary.warnings.push(...mapped.warnings);
          textIndex = header.findIndex((h) => h.column === 'text');
          continue;
        }
        summary.rowsRead++;
        const parsed = this.validate(record, raw, line, header, schema, rules);
        if ('error' in parsed) summary.rowsInvalid++;
        else summary.rowsValid++;
        const textCell = textIndex >= 0 ? (record[textIndex] ?? '') : '';
        const kept = 'row' in parsed ? (parsed.row as { text?: string | null }).text : null;
        if (kept && kept.length < textCell.length) summary.textsTruncated++;
        yield parsed;
      }
    } catch (error) {
      if (error instanceof ImportFileError) throw error;
      const code = (error as { code?: string }).code;
      if (code === 'CSV_QUOTE_NOT_CLOSED')
        throw new ImportFileError(
          'malformed_csv',
          `A quoted field that starts on line ${parsedEndLine + 1} is never closed, so the rest of the file cannot ` +
            'be read. Check for a stray double quote (") on that line.',
          parsedEndLine + 1,
        );
      if (code === 'CSV_MAX_RECORD_SIZE')
        throw new ImportFileError(
          'malformed_csv',
          `The record starting on line ${parsedEndLine + 1} is longer than ${maxRecordChars} characters; ` +
            'a stray double quote (") probably joined many lines into one field.',
          parsedEndLine + 1,
        );
      if (typeof code === 'string' && code.startsWith('CSV_'))
        throw new ImportFileError(
          'malformed_csv',
          `The CSV could not be read after line ${parsedEndLine}: ${shortText((error as Error).message, rawExcerptChars)}`,
          parsedEndLine + 1,
        );
      throw error;
    } finally {
      input.destroy();
      // A reader that stops early must not leave the upload or file handle open.
      if (!this.source.readableEnded) this.source.destroy();
    }

    if (!header) throw new ImportFileError('empty_file', 'The file is empty: it has no header and no rows.');
    if (summary.rowsRead === 0)
      summary.warnings.push('The file has a header but no rows; nothing was imported.');
    if (summary.textsTruncated > 0)
      summary.warnings.push(
        `${summary.textsTruncated} review text(s) were longer than ${importLimits.textMax} characters and were cut.`,
      );
    summary.bytes = counters.bytes;
    this.result = summary;
  }

  private validate(
    record: string[],
    raw: string,
    line: number,
    header: HeaderMapping[],
    schema: ReturnType<typeof createReviewCsvRowSchema> | ReturnType<typeof createAggregateCsvRowSchema>,
    rules: CrossRowRules,
  ): ParsedRecord<K> {
    const fail = (reason: string, column?: string): ParsedRecord<K> => ({
      line,
      error: { line, ...(column ? { column } : {}), reason, raw: excerpt(raw) },
    });
    // Spreadsheets pad rows with empty cells (`…,2026-05-01,,,`); only extra cells holding a value are wrong.
    if (record.length > header.length && record.slice(header.length).every((cell) => cell.trim() === ''))
      record = record.slice(0, header.length);
    if (record.length !== header.length) {
      return fail(
        `expected ${header.length} fields as in the header, found ${record.length}; ` +
          `check for an unquoted ${delimiterNames[this.delimiter]} inside a value`,
      );
    }
    const cells: Record<string, string> = {};
    const problems: { column: string | undefined; message: string }[] = [];
    header.forEach((h, i) => {
      const value = record[i] ?? '';
      if (h.column) cells[h.column] = value;
      else if (value.trim() !== '')
        problems.push({ column: undefined, message: `column ${h.position} has no header but holds a value` });
    });

    problems.push(...nulProblems(cells));
    let draft: ReviewRowDraft | AggregateRowDraft | null =
      problems.length === 0 && this.kind === 'reviews' ? fastReviewCsvRow(cells, this.clock) : null;
    const result = draft ? null : schema.safeParse(cells);
    if (result?.success) draft = result.data;
    else if (result)
      for (const issue of result.error.issues) {
        const column = typeof issue.path[0] === 'string' ? issue.path[0] : undefined;
        problems.push({ column, message: issue.message + showValue(column ? cells[column] : undefined) });
      }

    // Cross-row rules see every row whose identity is readable, so a broken first row still names its item.
    const category = cells.category?.trim().toLowerCase() ?? '';
    const sku = cells.sku?.trim() ?? '';
    const titleCell = cells.title?.trim().normalize('NFC');
    const title = sku
      ? rules.resolveTitle(category, sku, titleCell && titleFits(titleCell) ? titleCell : undefined)
      : undefined;
    if (draft) {
      if (title === undefined) problems.push({ column: 'title', message: titleMissingReason });
      const first = rules.duplicateOf(rules.duplicateKey(draft), line);
      if (first !== undefined)
        problems.unshift({
          column: this.kind === 'reviews' ? 'review_id' : 'observed_on',
          message: rules.duplicateReason(first),
        });
    }
    if (problems.length > 0 || !draft || title === undefined)
      return fail(problems.map((p) => p.message).join('; '), problems[0]?.column);
    return { line, row: { ...draft, title } as RowOf<K> };
  }
}

export function parseImport<K extends ImportKind>(
  source: Readable,
  kind: K,
  options: ImportParseOptions,
): ImportParse<K> {
  return new ImportParse(source, kind, options);
}

/** Reads a whole import into memory; for small inputs (samples, tests, the ingest API's CSV bodies). */
export async function collectImport<K extends ImportKind>(
  source: Readable,
  kind: K,
  options: ImportParseOptions,
): Promise<{ rows: { line: number; row: RowOf<K> }[]; errors: RowError[]; summary: ImportSummary }> {
  const run = parseImport(source, kind, options);
  const rows: { line: number; row: RowOf<K> }[] = [];
  const errors: RowError[] = [];
  for await (const record of run) {
    if ('row' in record) rows.push(record);
    else errors.push(record.error);
  }
  return { rows, errors, summary: run.summary };
}
