import { parseArgs } from 'node:util';
import { createScheduler } from '../../jobs/index';
import { isIsoWeekLabel } from '../../shared/iso-week';
import type { JobKind } from '../../shared/schemas/jobs.schema';
import { loadConfig } from '../config/env';
import { closeDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { findCategoryBySlug } from '../modules/categories/categories.service';
import { categoriesFor, queueRuns } from '../modules/jobs/jobs.service';
import { prepareDatabase } from '../runtime/database';

const usage = `Usage:
  npm run job -- snapshot --category <slug> [--week 2026-W48] [--replace]
  npm run job -- backfill --category <slug|all> [--from 2025-W40] [--to 2026-W48] [--replace]`;

const say = (line: string): void => console.log(`[ballast] ${line}`);

/**
 * `npm run job`: runs a job by hand in this process with the same code the scheduler uses. Each run is
 * recorded in the job history like any other (trigger "manual", by "command line").
 */
async function main(): Promise<number> {
  const { positionals, values } = parseArgs({
    allowPositionals: true,
    options: {
      category: { type: 'string' },
      week: { type: 'string' },
      from: { type: 'string' },
      to: { type: 'string' },
      replace: { type: 'boolean', default: false },
    },
  });
  const kind = positionals[0] as JobKind | undefined;
  if ((kind !== 'snapshot' && kind !== 'backfill') || !values.category) {
    console.error(usage);
    return 2;
  }
  for (const week of [values.week, values.from, values.to]) {
    if (week !== undefined && !isIsoWeekLabel(week)) {
      console.error(`"${week}" is not an ISO week such as 2026-W48.\n${usage}`);
      return 2;
    }
  }
  const config = loadConfig();
  setLogLevel('warn');
  const { embedded } = await prepareDatabase(config, say);
  try {
    let categoryIds: number[];
    if (values.category === 'all' && kind === 'backfill') {
      categoryIds = await categoriesFor(null);
    } else {
      const category = await findCategoryBySlug(values.category);
      if (!category) {
        console.error(`There is no category with the slug "${values.category}".`);
        return 1;
      }
      categoryIds = [category.id];
    }
    const scheduler = createScheduler({ onRunLog: (id, line) => say(`run ${id}: ${line}`) });
    const runs = await queueRuns(
      categoryIds.map((categoryId) => ({
        kind,
        categoryId,
        isoWeek: kind === 'snapshot' ? (values.week ?? null) : null,
        params: {
          replace: values.replace,
          ...(values.from ? { fromWeek: values.from } : {}),
          ...(values.to ? { toWeek: values.to } : {}),
        },
        trigger: 'manual' as const,
        createdBy: 'command line',
        owner: scheduler.owner,
      })),
    );
    let failed = 0;
    for (const [i, run] of runs.entries()) {
      say(
        `Run ${run.id} (${i + 1} of ${runs.length}): ${kind} of ${run.categoryName ?? `category ${run.categoryId}`}`,
      );
      const outcome = await scheduler.execute(run.id);
      say(`Run ${run.id} ${outcome}.`);
      if (outcome !== 'succeeded') failed += 1;
    }
    return failed > 0 ? 1 : 0;
  } finally {
    await closeDatabase();
    if (embedded?.startedHere) await embedded.stop();
  }
}

main()
  .then((code) => process.exit(code))
  .catch((err: unknown) => {
    console.error(`[ballast] ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  });
