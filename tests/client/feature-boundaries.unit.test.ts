import path from 'node:path';
import { ESLint } from 'eslint';
import { describe, expect, it } from 'vitest';
import { rootDir } from '../../server/config/env';

/*
 * DEVELOPERS.md: features do not import each other; the route that shows two features composes them.
 * The project's own ESLint configuration enforces it (import-x/no-restricted-paths, one zone per feature).
 */
const rule = 'import-x/no-restricted-paths';
// Only this rule runs: the rest of the configuration is `npm run lint`'s business, and far slower.
const eslint = new ESLint({ cwd: rootDir, ruleFilter: ({ ruleId }) => ruleId === rule });

describe('feature boundaries', () => {
  it('refuses a feature importing another feature', async () => {
    const [result] = await eslint.lintText(
      "import { useQueueBackfill } from '../../jobs/api/queue-backfill';\nexport const hook = useQueueBackfill;\n",
      { filePath: path.join(rootDir, 'src/features/what-if/components/probe.tsx') },
    );
    expect(result!.messages.map((m) => m.ruleId)).toContain(rule);
  }, 30_000);

  it('lets a feature import its own files and a route import any feature', async () => {
    const [own] = await eslint.lintText(
      "import { useQueueBackfill } from '../api/queue-backfill';\nexport const hook = useQueueBackfill;\n",
      { filePath: path.join(rootDir, 'src/features/jobs/components/probe.tsx') },
    );
    const [route] = await eslint.lintText(
      "import { useQueueBackfill } from '../../../features/jobs/api/queue-backfill';\nexport const hook = useQueueBackfill;\n",
      { filePath: path.join(rootDir, 'src/app/routes/jobs/probe.tsx') },
    );
    expect(own!.messages.filter((m) => m.ruleId === rule)).toEqual([]);
    expect(route!.messages.filter((m) => m.ruleId === rule)).toEqual([]);
  }, 30_000);

  it('holds for every file under src/features today', async () => {
    const results = await eslint.lintFiles(['src/features/**/*.{ts,tsx}']);
    const crossings = results.flatMap((r) =>
      r.messages
        .filter((m) => m.ruleId === rule)
        .map((m) => `${path.relative(rootDir, r.filePath)}:${m.line} ${m.message}`),
    );
    expect(crossings).toEqual([]);
  }, 60_000);
});
