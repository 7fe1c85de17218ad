import { setImmediate as yieldToEventLoop } from 'node:timers/promises';
import { stringify } from 'csv-stringify/sync';
import type { RowError } from '../../../shared/schemas/import.schema';

/*
 * Ballast stores cells exactly as uploaded (a review may well start with "-" or "="), but any CSV it writes
 * back out is opened in spreadsheets, which would run such cells as formulas. Following the OWASP advice on
 * CSV injection, text cells that start with one of these characters get a leading single quote on output.
 */
const formulaStart = /^[=+\-@\t\r]/;

export function neutraliseCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number' || typeof value === 'bigint' || typeof value === 'boolean')
    return String(value);
  if (value instanceof Date) return value.toISOString();
  const text = String(value);
  return formulaStart.test(text) ? `'${text}` : text;
}

export interface CsvColumn<T> {
  header: string;
  /** A property of the row, or a function of it. */
  value: keyof T | ((row: T) => unknown);
}

export interface ToCsvOptions {
  /** A UTF-8 byte order mark, so that spreadsheet programs read accents correctly. */
  bom?: boolean;
}

export function toCsv<T>(
  rows: Iterable<T>,
  columns: readonly CsvColumn<T>[],
  options: ToCsvOptions = {},
): string {
  const records: string[][] = [];
  for (const row of rows)
    records.push(
      columns.map((c) => neutraliseCell(typeof c.value === 'function' ? c.value(row) : row[c.value])),
    );
  return stringify(records, {
    header: true,
    columns: columns.map((c) => neutraliseCell(c.header)),
    bom: options.bom ?? false,
    record_delimiter: '\r\n',
    // A bare LF inside a value must be quoted too, or it would read as a new record.
    quoted_match: /[\r\n]/,
  });
}

/** Rows formatted between two turns of the event loop by toCsvInSlices (a few milliseconds of work). */
export const CSV_SLICE_ROWS = 1000;

/**
 * The same text as toCsv, built CSV_SLICE_ROWS rows at a time with a turn of the event loop between
 * slices, so a large export never holds other requests. Slices, not a worker: the rows are already in
 * this thread's memory, and copying them to a worker would cost about as much as formatting them.
 */
export async function toCsvInSlices<T>(
  rows: readonly T[],
  columns: readonly CsvColumn<T>[],
  options: ToCsvOptions = {},
): Promise<string> {
  const parts = [toCsv([], columns, options)];
  const headerless = columns.map((c) => ({ ...c, header: '' }));
  for (let start = 0; start < rows.length; start += CSV_SLICE_ROWS) {
    await yieldToEventLoop();
    const slice = toCsv(rows.slice(start, start + CSV_SLICE_ROWS), headerless);
    // Drop the (empty) header record of the slice: everything after its first record delimiter.
    parts.push(slice.slice(slice.indexOf('\r\n') + 2));
  }
  return parts.join('');
}

const rejectedRowColumns: CsvColumn<RowError>[] = [
  { header: 'line', value: 'line' },
  { header: 'column', value: 'column' },
  { header: 'reason', value: 'reason' },
  { header: 'raw', value: 'raw' },
];

/** The "rows we could not import" download of an import batch. */
export function rejectedRowsCsv(errors: Iterable<RowError>): string {
  return toCsv(errors, rejectedRowColumns, { bom: true });
}
