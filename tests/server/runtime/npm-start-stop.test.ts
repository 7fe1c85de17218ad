import { spawn } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { describe, expect, it } from 'vitest';
import { rootDir } from '../../../server/config/env';
import { freePort } from '../../../server/lib/free-port';

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function portOpen(port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const socket = net.connect({ host: '127.0.0.1', port });
    socket.once('connect', () => (socket.destroy(), resolve(true)));
    socket.once('error', () => resolve(false));
  });
}

async function until(what: string, check: () => boolean | Promise<boolean>, ms: number, log: () => string) {
  const deadline = Date.now() + ms;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`Timed out waiting for ${what}. Output:\n${log()}`);
    await sleep(200);
  }
}

// The real `npm start`, with its own private MariaDB in a temp data dir; the signal goes to the npm
// process alone, as a service manager sends it.
async function startAndSignal(signal: 'SIGINT' | 'SIGTERM', target: 'npm' | 'group' = 'npm'): Promise<void> {
  const dataDir = mkdtempSync(path.join(os.tmpdir(), 'ballast-stop-'));
  const [port, dbPort, smtpPort, landingPort] = [
    await freePort(),
    await freePort(),
    await freePort(),
    await freePort(),
  ];
  let log = '';
  const env: NodeJS.ProcessEnv = { ...process.env };
  delete env.DATABASE_URL;
  const npm = spawn('npm', ['start', '--', '--no-build'], {
    cwd: rootDir,
    detached: true,
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...env,
      NODE_ENV: 'test',
      PORT: String(port),
      PUBLIC_URL: `http://127.0.0.1:${port}`,
      BALLAST_DATA_DIR: dataDir,
      BALLAST_DB_PORT: String(dbPort),
      BALLAST_SMTP_PORT: String(smtpPort),
      BALLAST_LANDING_PORT: String(landingPort),
      BALLAST_DEMO: 'false',
      BALLAST_SCHEDULER: 'false',
      SESSION_SECRET: 'stop-test-secret-of-ballast',
      LOG_LEVEL: 'warn',
    },
  });
  npm.stdout.on('data', (d: Buffer) => (log += d.toString()));
  npm.stderr.on('data', (d: Buffer) => (log += d.toString()));
  const output = () => log;
  const pidFile = path.join(dataDir, 'mariadb', 'mysqld.pid');
  try {
    await until(
      'Ballast to start',
      () => {
        if (npm.exitCode !== null) throw new Error(`npm start exited:\n${log}`);
        return log.includes(`Ballast is running at http://127.0.0.1:${port}`);
      },
      180_000,
      output,
    );
    expect(await portOpen(port)).toBe(true);
    const dbPid = Number(readFileSync(pidFile, 'utf8').trim());
    expect(isAlive(dbPid)).toBe(true);

    process.kill(target === 'npm' ? npm.pid! : -npm.pid!, signal);
    await until('the server port to close', async () => !(await portOpen(port)), 60_000, output);
    await until('MariaDB to stop', () => !isAlive(dbPid) && !existsSync(pidFile), 90_000, output);
    await until('npm to exit', () => npm.exitCode !== null || npm.signalCode !== null, 30_000, output);
    // The server says so itself once MariaDB has stopped; the line may arrive after the process is gone.
    await until(
      'the server to report a clean stop',
      () => /MariaDB stopped cleanly\.[\s\S]*Stopped\./.test(log),
      30_000,
      output,
    );
  } finally {
    if (npm.exitCode === null && npm.signalCode === null) {
      try {
        process.kill(-npm.pid!, 'SIGKILL');
      } catch {
        // already gone
      }
    }
    if (existsSync(pidFile)) {
      const pid = Number(readFileSync(pidFile, 'utf8').trim());
      if (isAlive(pid)) process.kill(pid, 'SIGKILL');
    }
    rmSync(dataDir, { recursive: true, force: true });
  }
}

describe('npm start stops cleanly', () => {
  it('on SIGINT sent to the npm process: server first, then MariaDB', { timeout: 300_000 }, async () => {
    await startAndSignal('SIGINT');
  });
  it('on SIGTERM sent to the npm process', { timeout: 300_000 }, async () => {
    await startAndSignal('SIGTERM');
  });
  it('on SIGINT sent to the whole process group, as Ctrl-C does', { timeout: 300_000 }, async () => {
    await startAndSignal('SIGINT', 'group');
  });
});
