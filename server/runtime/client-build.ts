import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';

function newestMtime(target: string): number {
  if (!existsSync(target)) return 0;
  const stat = statSync(target);
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of readdirSync(target)) newest = Math.max(newest, newestMtime(path.join(target, entry)));
  return newest;
}

/** Builds the browser app when dist/ is missing or older than its sources. */
export function ensureClientBuilt(rootDir: string, log: (line: string) => void): void {
  const built = path.join(rootDir, 'dist', 'client', 'index.html');
  const sources = ['src', 'shared', 'index.html', 'vite.config.ts'].map((p) => path.join(rootDir, p));
  const builtAt = existsSync(built) ? statSync(built).mtimeMs : 0;
  if (builtAt > 0 && sources.every((s) => newestMtime(s) <= builtAt)) return;
  log('Building the web app (first start or changed sources)...');
  const result = spawnSync(
    process.execPath,
    [path.join(rootDir, 'node_modules', 'vite', 'bin', 'vite.js'), 'build'],
    {
      cwd: rootDir,
      stdio: ['ignore', 'ignore', 'inherit'],
    },
  );
  if (result.status !== 0) throw new Error('Building the web app failed; see the messages above.');
}
