import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, existsSync } from 'node:fs';
import path from 'node:path';
import { rootDir } from '../config/env';
import { ensureSystemPackages, testNeeds } from './system-packages';

/**
 * `npm test`: makes sure the Debian programs the tests drive are present, type-checks and lints, builds
 * the web app the browser tests load, then runs every vitest project (unit, server against a throw-away
 * MariaDB, e2e). Arguments after `--` go to vitest and skip the type-check and lint (for quick runs).
 */
const say = (line: string): void => console.log(`[ballast test] ${line}`);

function run(): number {
  ensureSystemPackages(testNeeds, say);

  const quick = process.argv.length > 2;
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
  const report = path.join(rootDir, 'test-results', 'vitest.json');
  const vitest = spawnSync(
    process.execPath,
    [
      path.join(rootDir, 'node_modules/vitest/vitest.mjs'),
      'run',
      '--reporter=default',
      '--reporter=json',
      `--outputFile.json=${report}`,
      ...process.argv.slice(2),
    ],
    { cwd: rootDir, stdio: 'inherit', env: { ...process.env, NODE_ENV: 'test' } },
  );
  if (existsSync(report)) {
    const summary = JSON.parse(readFileSync(report, 'utf8')) as {
      numPassedTests: number;
      numFailedTests: number;
      numPendingTests: number;
    };
    console.log(
      `${summary.numPassedTests} passed, ${summary.numFailedTests} failed, ${summary.numPendingTests} skipped`,
    );
  }
  return vitest.status ?? 1;
}

try {
  process.exit(run());
} catch (err) {
  console.error(`[ballast test] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
}
