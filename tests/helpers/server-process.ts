import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { rootDir } from '../../server/config/env';
import { freePort } from '../../server/lib/free-port';

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
  const smtpPort = await freePort();
  const landingPort = await freePort();
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
        PUBLIC_URL: `http://127.0.0.1:${port}`,
        SESSION_SECRET: 'e2e-secret-of-ballast',
        BALLAST_DEMO: 'true',
        LOG_LEVEL: 'warn',
        BALLAST_SMTP_PORT: String(smtpPort),
        BALLAST_LANDING_PORT: String(landingPort),
        ...env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const url = `http://127.0.0.1:${port}`;
  // Wait for our own process to say it listens: polling the port alone could reach another test's
  // server that took the same free port while this one was still seeding.
  const deadline = Date.now() + 180_000;
  while (!log.includes(`Ballast is running at http://127.0.0.1:${port}`)) {
    if (child.exitCode !== null) throw new Error(`Ballast exited at start:\n${log}`);
    if (Date.now() > deadline) throw new Error(`Ballast did not start in time:\n${log}`);
    await sleep(100);
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
