import { rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startEmbeddedMariadb, type EmbeddedMariadb } from '../../../server/db/embedded-mariadb';
import { freePort } from '../../../server/lib/free-port';
import { startServerProcess, type ServerProcess } from '../../helpers/server-process';

/** Ballast as a real process on a MariaDB of its own that this test stops and starts again. */
let dir: string;
let port: number;
let database: EmbeddedMariadb;
let server: ServerProcess;

beforeAll(async () => {
  dir = path.join(os.tmpdir(), `ballast-outage-${process.pid}`);
  rmSync(dir, { recursive: true, force: true });
  port = await freePort();
  database = await startEmbeddedMariadb({ dir, port, database: 'ballast_outage' });
  server = await startServerProcess(database.url, { BALLAST_SCHEDULER: 'false' });
}, 120_000);

afterAll(async () => {
  await server?.stop();
  await database?.stop();
  rmSync(dir, { recursive: true, force: true });
});

async function health(): Promise<{ status: number; body: { db?: string; reason?: string } }> {
  const res = await fetch(`${server.url}/api/health`);
  return { status: res.status, body: (await res.json()) as { db?: string; reason?: string } };
}

describe('the database stops while Ballast runs', () => {
  it('answers 503 with a reason, and recovers by itself when the database returns', async () => {
    expect((await health()).status).toBe(200);
    // A visitor with a session: every request of theirs needs the session store, i.e. the database.
    const visit = await fetch(`${server.url}/api/auth/csrf`);
    const cookie = (visit.headers.get('set-cookie') ?? '').split(';')[0]!;
    // The session is stored: the same cookie gets the same CSRF token back.
    const token = ((await visit.json()) as { csrfToken: string }).csrfToken;
    const again = await fetch(`${server.url}/api/auth/csrf`, { headers: { cookie } });
    expect(((await again.json()) as { csrfToken: string }).csrfToken).toBe(token);
    await database.stop();

    const down = await health();
    expect(down.status).toBe(503);
    expect(down.body.db).toBe('down');
    expect(down.body.reason).toMatch(/The database does not answer/);
    const me = await fetch(`${server.url}/api/categories`, { headers: { cookie } });
    const body = (await me.json()) as { error: { code: string } };
    expect(me.status, JSON.stringify(body)).toBe(503);
    expect(body.error.code).toBe('db_unavailable');

    database = await startEmbeddedMariadb({ dir, port, database: 'ballast_outage' });
    let recovered = 0;
    // Bounded by time, not by a count of tries, so a loaded machine gets the same 30 s.
    for (const until = Date.now() + 30_000; recovered !== 200 && Date.now() < until;) {
      recovered = (await health()).status;
      if (recovered !== 200) await sleep(200);
    }
    expect(recovered).toBe(200);
    expect(server.child.exitCode).toBeNull();
  }, 120_000);
});
