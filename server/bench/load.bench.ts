import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import autocannon from 'autocannon';
import { startEmbeddedMariadb } from '../db/embedded-mariadb';
import { migrateUp } from '../db/migrator';
import { Category, User } from '../db/models';
import { closeDatabase, openDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { hashPassword } from '../modules/auth/auth.service';
import { freePort } from '../lib/free-port';
import { startServerProcess, type ServerProcess } from '../../tests/helpers/server-process';
import { fillCategory, signIn } from './standings.bench';

const CONNECTIONS = 50;
const DURATION_S = 30;
const ROWS_PER_INGEST = 5;

type Figures = { name: string; p50: number; p99: number; rps: number; requests: number; errors: number };

/** Resident memory of a process in MB, from /proc (Linux). */
function rssMb(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8')
    .split('\n')
    .find((l) => l.startsWith('VmRSS:'));
  if (!line) throw new Error(`No VmRSS for process ${pid}.`);
  return Number(line.replace(/\D+/g, '')) / 1024;
}

function figures(name: string, result: autocannon.Result): Figures {
  return {
    name,
    p50: result.latency.p50,
    p99: result.latency.p99,
    rps: result.requests.average,
    requests: result.requests.total,
    errors: result.errors + result.non2xx + result.timeouts,
  };
}

/**
 * Load on a real Ballast process: standings and an item timeline with a signed-in session, and the
 * ingest API with a bearer token, each with 50 connections for 30 s on loopback. Reports latency,
 * throughput, errors and the server's resident memory before and after.
 */
export async function run(): Promise<void> {
  setLogLevel('silent');
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ballast-bench-load-'));
  const mariadb = await startEmbeddedMariadb({ dir, port: await freePort(), database: 'ballast_load' });
  let server: ServerProcess | undefined;
  try {
    const sequelize = openDatabase(mariadb.url);
    await migrateUp(sequelize);
    const category = await Category.create({
      slug: 'bench-category',
      name: 'Bench Category',
      description: '',
      settings: {},
    });
    const password = 'load-bench-password';
    for (const role of ['analyst', 'admin'] as const) {
      await User.create({
        email: `bench.${role}@bench.ballast.test`,
        name: `Bench ${role}`,
        role,
        passwordHash: await hashPassword(password),
        lockedUntil: null,
        lastLoginAt: null,
      });
    }
    const started = performance.now();
    const sku = await fillCategory(sequelize, category.id);
    const [[counts]] = (await sequelize.query(
      'SELECT (SELECT COUNT(*) FROM items) AS items, (SELECT COUNT(*) FROM snapshot_rows) AS rows_',
    )) as [{ items: number; rows_: number }[], unknown];
    console.log(
      `load: ${counts!.items} items, ${counts!.rows_} snapshot rows written in ${((performance.now() - started) / 1000).toFixed(1)} s`,
    );
    await closeDatabase();

    // Ballast as `npm start` runs it (minus the client build), on its own port, scheduler off.
    server = await startServerProcess(mariadb.url, {
      NODE_ENV: 'production',
      SESSION_SECRET: 'load-bench-secret-of-ballast',
      BALLAST_SCHEDULER: 'false',
      BALLAST_DEMO: 'false',
    });
    const ballast = server.child;
    const base = server.url;
    const cookie = await signIn(base, 'bench.analyst@bench.ballast.test', password);

    // An ops token through the real admin API (session cookie and CSRF token, as the web app sends them).
    const adminCookie = await signIn(base, 'bench.admin@bench.ballast.test', password);
    const csrf = (await (
      await fetch(`${base}/api/auth/csrf`, { headers: { cookie: adminCookie } })
    ).json()) as {
      csrfToken: string;
    };
    const created = await fetch(`${base}/api/admin/tokens`, {
      method: 'POST',
      headers: { cookie: adminCookie, 'x-csrf-token': csrf.csrfToken, 'content-type': 'application/json' },
      body: JSON.stringify({ name: 'Load bench feed', role: 'ops' }),
    });
    if (created.status !== 201)
      throw new Error(`Token creation answered ${created.status}: ${await created.text()}`);
    const { secret } = (await created.json()) as { secret: string };

    const standingsPath =
      '/api/categories/bench-category/standings?sort=drift&dir=desc&flags=thin&driftMin=-400&q=item&page=2&pageSize=50';
    const timelinePath = `/api/categories/bench-category/items/${sku}`;
    const ingestPath = '/api/ingest/reviews';
    const [items] = (await openDatabase(mariadb.url).query(
      'SELECT sku, title FROM items ORDER BY id LIMIT 200',
    )) as [{ sku: string; title: string }[], unknown];
    await closeDatabase();
    let counter = 0;
    const ingestBody = (): string => {
      counter += 1;
      const rows = Array.from({ length: ROWS_PER_INGEST }, (_, k) => {
        const item = items[(counter * ROWS_PER_INGEST + k) % items.length]!;
        return {
          reviewId: `load-${counter}-${k}`,
          sku: item.sku,
          title: item.title,
          category: 'bench-category',
          stars: 1 + ((counter + k) % 5),
          reviewedAt: '2026-11-20',
        };
      });
      return JSON.stringify({ mode: 'valid_rows', rows });
    };

    // Warm up every path once and check it answers before measuring.
    for (const p of [standingsPath, timelinePath]) {
      const res = await fetch(`${base}${p}`, { headers: { cookie } });
      if (!res.ok) throw new Error(`${p} answered ${res.status}: ${await res.text()}`);
    }
    const warm = await fetch(`${base}${ingestPath}`, {
      method: 'POST',
      headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' },
      body: ingestBody(),
    });
    const warmBody = (await warm.json()) as { rowsAccepted?: number };
    if (!warm.ok || warmBody.rowsAccepted !== ROWS_PER_INGEST)
      throw new Error(`${ingestPath} answered ${warm.status}: ${JSON.stringify(warmBody)}`);
    await sleep(2000);
    const before = rssMb(ballast.pid!);
    let peak = before;
    const sampler = setInterval(() => (peak = Math.max(peak, rssMb(ballast.pid!))), 250);

    const results: Figures[] = [];
    const rssAfter: string[] = [];
    const note = (phase: string) => rssAfter.push(`${phase} ${rssMb(ballast.pid!).toFixed(0)} MB`);
    const session = { cookie, accept: 'application/json' };
    results.push(
      figures(
        'standings (drift desc, thin, text, drift range, page 2 of 50)',
        await autocannon({
          url: `${base}${standingsPath}`,
          connections: CONNECTIONS,
          duration: DURATION_S,
          headers: session,
        }),
      ),
    );
    note('standings');
    results.push(
      figures(
        'item timeline over 104 weeks',
        await autocannon({
          url: `${base}${timelinePath}`,
          connections: CONNECTIONS,
          duration: DURATION_S,
          headers: session,
        }),
      ),
    );
    note('timeline');
    results.push(
      figures(
        `POST ${ingestPath} (bearer token, ${ROWS_PER_INGEST} new reviews per request)`,
        await autocannon({
          url: base,
          connections: CONNECTIONS,
          duration: DURATION_S,
          requests: [
            {
              method: 'POST',
              path: ingestPath,
              headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' },
              setupRequest: (req) => ({ ...req, body: ingestBody() }),
            },
          ],
        }),
      ),
    );
    note('ingest');
    clearInterval(sampler);
    await sleep(5000);
    const after = rssMb(ballast.pid!);

    console.log(
      `load: autocannon, ${CONNECTIONS} connections, ${DURATION_S} s each, loopback, one Ballast process ` +
        `(heap growth ${process.env.BALLAST_HEAP_GROWTH_PERCENT ?? 'default 50'}%)`,
    );
    for (const f of results) {
      console.log(
        `load: ${f.name}: median ${f.p50.toFixed(1)} ms, p99 ${f.p99.toFixed(1)} ms, ${f.rps.toFixed(0)} req/s, ` +
          `${f.requests} requests, ${f.errors} errors`,
      );
    }
    const [[ingested]] = (await openDatabase(mariadb.url).query(
      "SELECT COUNT(*) AS n FROM reviews WHERE external_id LIKE 'load-%'",
    )) as [{ n: number }[], unknown];
    await closeDatabase();
    console.log(`load: ${ingested!.n} reviews written by the ingest run (${counter} request bodies built)`);
    const change = (after - before) / before;
    console.log(
      `load: server RSS after each run: ${rssAfter.join(', ')}; highest during the runs ${peak.toFixed(0)} MB`,
    );
    console.log(
      `load: server RSS ${before.toFixed(0)} MB before, ${after.toFixed(0)} MB after (${change >= 0 ? '+' : ''}${(change * 100).toFixed(0)}%): ` +
        (Math.abs(change) <= 0.2 ? 'within 20%' : 'NOT within 20%'),
    );
  } finally {
    await server?.stop();
    await closeDatabase();
    await mariadb.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}
