import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { rootDir } from '../../server/config/env';
import { freePort } from './global-setup';

export type ServerProcess = {
  url: string;
  child: ChildProcess;
  output: () => string;
  stop: () => Promise<void>;
};

/** Starts Ballast as a real process (as `npm start` does, minus the build) on a free port. */
export async function startServerProcess(
  databaseUrl: string,
  env: Record<string, string> = {},
): Promise<ServerProcess> {
  const port = await freePort();
  let log = '';
  const child = spawn(
    process.execPath,
    ['--import', 'tsx', path.join(rootDir, 'server/index.ts'), '--no-build'],
    {
      cwd: rootDir,
      env: {
        ...process.env,
        NODE_ENV: 'test',
        DATABASE_URL: databaseUrl,
        PORT: String(port),
        SESSION_SECRET: 'e2e-secret-of-ballast',
        BALLAST_DEMO: 'true',
        LOG_LEVEL: 'warn',
        ...env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`Ballast exited at start:\n${log}`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) break;
    } catch {
      // not listening yet
    }
    await sleep(200);
  }
  return {
    url,
    child,
    output: () => log,
    stop: async () => {
      if (child.exitCode !== null) return;
      child.kill('SIGTERM');
      await new Promise((resolve) => child.once('exit', resolve));
    },
  };
}
