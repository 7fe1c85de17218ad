import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, existsSync, rmSync } from 'node:fs';
import path from 'node:path';
import { rootDir } from '../config/env';
import { clusterNeeds, ensureSystemPackages, testNeeds } from './system-packages';

/**
 * `npm test`: makes sure the Debian programs the tests drive are present, type-checks and lints, builds
 * the web app the browser tests load, then runs every vitest project (unit, server against a throw-away
 * MariaDB, e2e) under TZ=UTC, then the number-producing tests again under TZ=Pacific/Auckland; the closing
 * line adds both runs. Last, on full runs, the cluster drill (`npm run drill -- cluster`: three Galera nodes,
 * one Ballast server per node; 110–134 s on the shared 2-core machine). Arguments after `--` go to vitest
 * and skip the type-check, lint, second run and drill.
 */
const say = (line: string): void => console.log(`[ballast test] ${line}`);

function run(): number {
  const quick = process.argv.length > 2;
  ensureSystemPackages(quick ? testNeeds : [...testNeeds, ...clusterNeeds.slice(1)], say);

  if (!quick) {
    for (const script of ['typecheck', 'lint']) {
      say(`npm run ${script}`);
      const step = spawnSync('npm', ['run', '--silent', script], { cwd: rootDir, stdio: 'inherit' });
      if (step.status !== 0) return step.status ?? 1;
    }
  }

  say('Building the web app for the browser tests...');
  const build = spawnSync(
    process.execPath,
    [path.join(rootDir, 'node_modules/vite/bin/vite.js'), 'build', '--logLevel', 'warn'],
    {
      cwd: rootDir,
      stdio: 'inherit',
    },
  );
  if (build.status !== 0) return build.status ?? 1;

  mkdirSync(path.join(rootDir, 'test-results'), { recursive: true });
  const main = vitestRun('vitest.json', 'UTC', process.argv.slice(2));
  // The number-producing tests again in a zone 13 hours from UTC: Ballast's figures must not depend on
  // the server's zone (one clock, shared/clock.ts). Only on full runs: 26 files, 344 tests, 5 min 18 s on
  // the shared 2-core machine under load (its tests alone took 241 s of that).
  const auckland = quick
    ? { status: 0, summary: null }
    : (say('Number-producing tests again under TZ=Pacific/Auckland...'),
      vitestRun('vitest-auckland.json', 'Pacific/Auckland', [
        '--project',
        'unit',
        '--project',
        'server',
        ...zoneCheckedTests,
      ]));
  const runs = [main.summary, auckland.summary].filter((s) => s !== null);
  if (runs.length > 0) {
    const sum = (key: 'numPassedTests' | 'numFailedTests' | 'numPendingTests') =>
      runs.reduce((n, s) => n + s[key], 0);
    // The failures again, last, so that the tail of a long CI log names them.
    for (const [zone, s] of [
      ['UTC', main.summary],
      ['Pacific/Auckland', auckland.summary],
    ] as const) {
      for (const file of s?.testResults ?? []) {
        const failed = file.assertionResults.filter((a) => a.status === 'failed');
        if (file.status === 'failed' && failed.length === 0) {
          console.log(
            `FAILED (TZ=${zone}) ${path.relative(rootDir, file.name)}: ${file.message ?? 'did not run'}`,
          );
        }
        for (const test of failed) {
          const where = path.relative(rootDir, file.name);
          console.log(`FAILED (TZ=${zone}) ${where} > ${test.fullName}`);
          const why = test.failureMessages[0]?.split('\n')[0];
          if (why) console.log(`  ${why.slice(0, 300)}`);
        }
      }
    }
    console.log(
      `${sum('numPassedTests')} passed, ${sum('numFailedTests')} failed, ${sum('numPendingTests')} skipped`,
    );
  }
  if (main.status !== 0) return main.status;
  if (auckland.status !== 0) return auckland.status;
  if (quick) return 0;
  say('Cluster drill (npm run drill -- cluster)...');
  const drill = spawnSync('npm', ['run', '--silent', 'drill', '--', 'cluster'], {
    cwd: rootDir,
    stdio: 'inherit',
  });
  return drill.status ?? 1;
}

type Summary = {
  numPassedTests: number;
  numFailedTests: number;
  numPendingTests: number;
  testResults?: {
    name: string;
    status: string;
    message?: string;
    assertionResults: { fullName: string; status: string; failureMessages: string[] }[];
  }[];
};

/** Path filters (substrings) of the tests whose figures a server zone could change. */
const zoneCheckedTests = [
  'tests/shared/',
  '.unit.test.ts',
  'tests/server/snapshots/',
  'tests/server/score/',
  'tests/server/standings/',
  'tests/server/imports/',
  'tests/jobs/snapshot-job.test.ts',
  'tests/jobs/job-command.test.ts',
];

function vitestRun(
  reportName: string,
  tz: string,
  args: string[],
): { status: number; summary: Summary | null } {
  const report = path.join(rootDir, 'test-results', reportName);
  rmSync(report, { force: true });
  const vitest = spawnSync(
    process.execPath,
    [
      path.join(rootDir, 'node_modules/vitest/vitest.mjs'),
      'run',
      '--reporter=default',
      '--reporter=json',
      `--outputFile.json=${report}`,
      ...args,
    ],
    { cwd: rootDir, stdio: 'inherit', env: { ...process.env, NODE_ENV: 'test', TZ: tz } },
  );
  const summary = existsSync(report) ? (JSON.parse(readFileSync(report, 'utf8')) as Summary) : null;
  return { status: vitest.status ?? 1, summary };
}

try {
  process.exit(run());
} catch (err) {
  console.error(`[ballast test] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
}
