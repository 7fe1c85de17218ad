import { rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { TestProject } from 'vitest/node';
import { startEmbeddedMariadb } from '../../server/db/embedded-mariadb';
import { freePort } from '../../server/lib/free-port';

declare module 'vitest' {
  export interface ProvidedContext {
    dbServerUrl: string;
  }
}

/** A throw-away MariaDB for one test run: own data directory and port, removed afterwards. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const dir = path.join(os.tmpdir(), `ballast-test-${process.pid}-${project.name}`);
  rmSync(dir, { recursive: true, force: true });
  const db = await startEmbeddedMariadb({ dir, port: await freePort(), database: 'ballast_test' });
  project.provide('dbServerUrl', db.url);
  return async () => {
    await db.stop();
    rmSync(dir, { recursive: true, force: true });
  };
}
