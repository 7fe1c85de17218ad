/**
 * Calibrates a category's prior weight against an observed ordering and prints the same JSON as
 * POST /api/calibrations, computed in the same worker pool.
 *   npm run calibrate -- <request.json>
 *   npm run calibrate -- <skus.txt> --category=SLUG [--week=YYYY-Www]   (one sku per line, best first)
 * Exit code 1 with one line on stderr for bad input.
 */
import { readFile } from 'node:fs/promises';
import { extname } from 'node:path';
import { parseArgs } from 'node:util';
import { calibrationRequestSchema } from '../../shared/schemas/calibration.schema';
import { loadConfig } from '../config/env';
import { closeDatabase } from '../db/sequelize';
import type { Actor } from '../lib/actor';
import { setLogLevel } from '../lib/logger';
import { runCalibration } from '../modules/calibrations/calibrations.service';
import { prepareDatabase } from '../runtime/database';
import { closeWorkers } from '../workers/pool';

/** Whoever runs the command on the server's host reads every category, as an administrator does. */
const operator: Actor = {
  kind: 'user',
  id: 0,
  email: 'operator@localhost',
  name: 'Command line',
  role: 'admin',
  categoryIds: null,
} as Actor;

async function main(): Promise<void> {
  const { values, positionals } = parseArgs({
    allowPositionals: true,
    options: { category: { type: 'string' }, week: { type: 'string' } },
  });
  const file = positionals[0];
  if (!file) throw new Error('usage: npm run calibrate -- <request.json | skus.txt --category=SLUG>');
  const text = await readFile(file, 'utf8').catch(() => {
    throw new Error(`cannot read ${file}`);
  });
  const raw: unknown =
    extname(file).toLowerCase() === '.json'
      ? JSON.parse(text)
      : {
          category: values.category,
          week: values.week,
          observed: text
            .split(/\r?\n/)
            .map((l) => l.trim())
            .filter(Boolean),
        };
  const parsed = calibrationRequestSchema.safeParse(raw);
  if (!parsed.success) throw new Error(parsed.error.issues[0]?.message ?? 'the request is not valid');
  const config = loadConfig();
  setLogLevel('warn');
  const { embedded } = await prepareDatabase(config, (line) => console.error(`[ballast] ${line}`));
  try {
    process.stdout.write(`${JSON.stringify(await runCalibration(operator, parsed.data), null, 2)}\n`);
  } finally {
    await closeWorkers();
    await closeDatabase();
    if (embedded?.startedHere) await embedded.stop();
  }
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : String(err));
  process.exitCode = 1;
});
