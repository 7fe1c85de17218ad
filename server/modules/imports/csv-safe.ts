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
