/**
 * Scores a category from a file and prints the same JSON as POST /api/score.
 *   npm run score -- <file.json|file.csv> [--as-of=YYYY-MM-DD]
 * JSON: the API request body. CSV: a header row with sku,title,count,mean and optionally
 * stars_1..stars_5 (a row with all five star columns filled is read as a histogram; count and
 * mean may then be left empty). Exit code 1 with one line on stderr for bad input.
 */
import { readFile } from 'node:fs/promises';
import { extname } from 'node:path';
import { parse } from 'csv-parse/sync';
import { describeIssues, scoreRequestSchema } from '../../shared/schemas/score.schema';
import { ScoringInputError } from '../../shared/scoring/errors';
import { scorePage } from '../workers/tasks';

class CliError extends Error {}

function numberOrNull(value: string | undefined, where: string): number | null {
  if (value === undefined || value.trim() === '') return null;
  const n = Number(value);
  if (!Number.isFinite(n)) throw new CliError(`${where}: "${value}" is not a number`);
  return n;
}

function requestFromCsv(text: string): unknown {
  const rows = parse(text, { columns: true, skip_empty_lines: true, trim: true, bom: true }) as Record<
    string,
    string
  >[];
  const starKeys = ['stars_1', 'stars_2', 'stars_3', 'stars_4', 'stars_5'];
  return {
    items: rows.map((row, i) => {
      const where = `line ${i + 2}`;
      const stars = starKeys.map((k) => numberOrNull(row[k], `${where} ${k}`));
      const filled = stars.filter((v) => v !== null).length;
      if (filled > 0 && filled < 5) throw new CliError(`${where}: fill all of stars_1..stars_5 or none`);
      const item: Record<string, unknown> = { sku: row.sku ?? '', title: row.title || null };
      const count = numberOrNull(row.count, `${where} count`);
      const mean = numberOrNull(row.mean, `${where} mean`);
      if (count !== null) item.count = count;
      if (mean !== null) item.mean = mean;
      if (filled === 5) item.histogram = stars;
      return item;
    }),
  };
}

async function main(argv: string[]): Promise<void> {
  const file = argv.find((a) => !a.startsWith('--'));
  const asOfArg = argv.find((a) => a.startsWith('--as-of='))?.slice('--as-of='.length);
  if (!file) throw new CliError('usage: npm run score -- <file.json|file.csv> [--as-of=YYYY-MM-DD]');
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch {
    throw new CliError(`cannot read ${file}`);
  }
  let body: unknown;
  if (extname(file).toLowerCase() === '.csv') {
    try {
      body = requestFromCsv(text);
    } catch (err) {
      if (err instanceof CliError) throw err;
      throw new CliError(`${file}: not a readable CSV (${(err as Error).message})`);
    }
  } else {
    try {
      body = JSON.parse(text);
    } catch {
      throw new CliError(`${file}: not valid JSON`);
    }
  }
  if (asOfArg && body && typeof body === 'object') body = { ...body, asOf: asOfArg };
  const parsed = scoreRequestSchema.safeParse(body);
  if (!parsed.success) {
    const issues = describeIssues(parsed.error);
    const more = issues.length > 3 ? ` (and ${issues.length - 3} more)` : '';
    throw new CliError(`${file}: ${issues.slice(0, 3).join('; ')}${more}`);
  }
  const result = scorePage(parsed.data, new Date());
  process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
}

main(process.argv.slice(2)).catch((err: unknown) => {
  const message =
    err instanceof CliError || err instanceof ScoringInputError
      ? err.message
      : `unexpected error: ${String(err)}`;
  process.stderr.write(`score: ${message.replace(/\s+/g, ' ')}\n`);
  process.exit(1);
});
