import { spawn, type ChildProcess } from 'node:child_process';
import { rmSync } from 'node:fs';
import { createInterface } from 'node:readline';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { setTimeout as sleep } from 'node:timers/promises';
import mariadb from 'mariadb';
import { rootDir } from '../config/env';
import {
  killNode,
  nodePid,
  nodesOf,
  nodeState,
  nodeUrl,
  startCluster,
  startNode,
  stopCluster,
  waitSynced,
  type ClusterLayout,
  type ClusterNode,
} from '../db/galera-cluster';
import { freePort } from '../lib/free-port';
import { clusterNeeds, ensureSystemPackages } from '../scripts/system-packages';

/*
 * The cluster drill (issue 20): a three-node Galera cluster on loopback in a throw-away directory, one
 * Ballast server per node, and four checks, each printed PASS or FAIL with its figures:
 *   1. scheduled runs claimed exactly once across nodes (three processes, one per node, claim the same
 *      due times at the same instant through the product's claimDueRuns);
 *   2. a session made on one server is valid on every server (and its end is seen on every server);
 *   3. an import through the ingest API survives the loss of the node it writes to: the client retries the
 *      failed request on another server; rows are upserted by (item, review id), so nothing is duplicated;
 *   4. the killed node rejoins and every node holds the same rows (counts and CHECKSUM TABLE).
 * Every process it starts is stopped on the way out, also on failure or Ctrl-C.
 */

const thisFile = fileURLToPath(import.meta.url);
const dueTimes = 15;
const ingestRows = 6_000;
const ingestBatch = 500;
const killAtBatch = 4;
const sessionSecret = 'cluster-drill-secret-of-ballast';

type Check = { name: string; pass: boolean; figures: string };

const say = (line: string): void => console.log(`[cluster drill] ${line}`);

function seconds(since: number): string {
  return `${((Date.now() - since) / 1000).toFixed(1)} s`;
}

/* ---------- Ballast servers ---------- */

type Server = { n: number; url: string; child: ChildProcess; output: () => string };

async function startServer(n: number, databaseUrl: string): Promise<Server> {
  const port = await freePort();
  const smtpPort = await freePort();
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
        SESSION_SECRET: sessionSecret,
        BALLAST_DEMO: 'false',
        BALLAST_SCHEDULER: 'true',
        BALLAST_WORKERS: '1',
        LOG_LEVEL: 'warn',
        BALLAST_SMTP_PORT: String(smtpPort),
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const deadline = Date.now() + 120_000;
  while (!log.includes(`Ballast is running at http://127.0.0.1:${port}`)) {
    if (child.exitCode !== null) throw new Error(`Ballast server ${n} exited at start:\n${log}`);
    if (Date.now() > deadline) throw new Error(`Ballast server ${n} did not start in 120 s:\n${log}`);
    await sleep(100);
  }
  return { n, url: `http://127.0.0.1:${port}`, child, output: () => log };
}

async function stopServer(server: Server): Promise<void> {
  if (server.child.exitCode !== null || server.child.signalCode !== null) return;
  server.child.kill('SIGTERM');
  const exited = new Promise((resolve) => server.child.once('exit', resolve));
  if ((await Promise.race([exited, sleep(15_000, 'late')])) === 'late') server.child.kill('SIGKILL');
}

/** A fetch that keeps the session cookie, with a bound on every request. */
class Client {
  cookie = '';
  csrf = '';
  async call(
    base: string,
    method: string,
    url: string,
    body?: unknown,
    headers: Record<string, string> = {},
  ): Promise<{ status: number; json: unknown }> {
    const res = await fetch(`${base}${url}`, {
      method,
      headers: {
        ...(this.cookie ? { cookie: this.cookie } : {}),
        ...(this.csrf ? { 'x-csrf-token': this.csrf } : {}),
        ...(body !== undefined ? { 'content-type': 'application/json' } : {}),
        ...headers,
      },
      body: body === undefined ? undefined : JSON.stringify(body),
      signal: AbortSignal.timeout(20_000),
    });
    const set = res.headers.getSetCookie().find((c) => c.startsWith('ballast.sid='));
    if (set) this.cookie = set.split(';')[0]!;
    const text = await res.text();
    let json: unknown = null;
    try {
      json = text ? JSON.parse(text) : null;
    } catch {
      json = text;
    }
    return { status: res.status, json };
  }
}

/* ---------- SQL on one node ---------- */

async function onNode<T>(node: ClusterNode, sql: string, values?: unknown[]): Promise<T> {
  const conn = await mariadb.createConnection({
    socketPath: node.socket,
    user: 'root',
    database: 'ballast',
    connectTimeout: 2000,
  });
  try {
    // Causality check: the read waits until this node has applied every write set seen so far.
    await conn.query('SET SESSION wsrep_sync_wait = 15');
    return (await conn.query(sql, values)) as T;
  } finally {
    await conn.end();
  }
}

async function statusSum(nodes: ClusterNode[], names: string[]): Promise<number> {
  let sum = 0;
  for (const node of nodes) {
    if (nodePid(node) === null) continue;
    const rows = await onNode<{ Value: string }[]>(
      node,
      `SHOW GLOBAL STATUS WHERE Variable_name IN (${names.map(() => '?').join(',')})`,
      names,
    );
    for (const r of rows) sum += Number(r.Value);
  }
  return sum;
}

/* ---------- check 1: claims ---------- */

type ClaimResult = { node: number; claimed: number[]; errors: string[] };

/** In a child process: claim every due time of the drill's schedule on one node, started together. */
async function claimChild(url: string, node: number, scheduleId: number, baseMs: number) {
  const { openDatabase, closeDatabase } = await import('../db/sequelize');
  const { setLogLevel } = await import('../lib/logger');
  const { claimDueRuns } = await import('../modules/jobs/jobs.service');
  setLogLevel('silent');
  await openDatabase(url).authenticate();
  const result: ClaimResult = { node, claimed: [], errors: [] };
  // Before each due time the three processes wait for one another, so their claims of it overlap.
  const lines = createInterface({ input: process.stdin })[Symbol.asyncIterator]();
  for (let k = 0; k < dueTimes; k++) {
    process.stdout.write(`READY ${k}\n`);
    await lines.next();
    try {
      const ids = await claimDueRuns({
        scheduleId,
        dueAt: new Date(baseMs + k * 60_000),
        trigger: 'schedule',
        owner: `cluster-drill-node${node}`,
        now: new Date(),
      });
      result.claimed.push(...ids);
    } catch (err) {
      result.errors.push(err instanceof Error ? err.message : String(err));
    }
  }
  await closeDatabase();
  process.stdout.write(`RESULT ${JSON.stringify(result)}\n`);
}

type ClaimChild = { ready: (k: number) => Promise<void>; go: () => void; result: Promise<ClaimResult> };

function startClaimChild(url: string, node: number, scheduleId: number, baseMs: number): ClaimChild {
  const proc = spawn(
    process.execPath,
    ['--import', 'tsx', thisFile, '--claim-child', url, String(node), String(scheduleId), String(baseMs)],
    { cwd: rootDir, stdio: ['pipe', 'pipe', 'inherit'] },
  );
  let out = '';
  let exited = false;
  const waiters: (() => void)[] = [];
  const wake = (): void => {
    for (const w of waiters.splice(0)) w();
  };
  proc.stdout.on('data', (d: Buffer) => {
    out += d.toString();
    wake();
  });
  const ready = async (k: number): Promise<void> => {
    // Bounded: a child that stops answering ends the check instead of hanging it.
    const deadline = Date.now() + 120_000;
    while (!out.includes(`READY ${k}\n`) && !exited) {
      if (Date.now() > deadline) throw new Error(`The claiming process on node ${node} stopped answering.`);
      await Promise.race([new Promise<void>((resolve) => waiters.push(resolve)), sleep(1_000)]);
    }
  };
  const result = new Promise<ClaimResult>((resolve, reject) => {
    proc.once('error', reject);
    proc.once('exit', (code) => {
      exited = true;
      wake();
      const line = out.split('\n').find((l) => l.startsWith('RESULT '));
      if (code !== 0 || !line)
        reject(new Error(`The claiming process on node ${node} exited with ${code}:\n${out}`));
      else resolve(JSON.parse(line.slice(7)) as ClaimResult);
    });
  });
  return { ready, go: () => proc.stdin.write('go\n'), result };
}

async function checkClaims(layout: ClusterLayout, nodes: ClusterNode[]): Promise<Check> {
  const node1 = nodes[0]!;
  const categories = Number(
    (await onNode<{ n: bigint }[]>(node1, 'SELECT COUNT(*) AS n FROM categories'))[0]!.n,
  );
  const inserted = await onNode<{ insertId: bigint }>(
    node1,
    `INSERT INTO report_schedules (name, cron, time_zone, category_ids, recipients, produce, enabled, last_due_at, created_by, created_at, updated_at)
     VALUES ('Cluster drill', '0 3 1 1 *', 'UTC', NULL, '[]', 'snapshot', 1, NULL, NULL, UTC_TIMESTAMP(), UTC_TIMESTAMP())`,
  );
  const scheduleId = Number(inserted.insertId);
  // Due times after the schedule's own latest occurrence, so no server's catch-up claims one of them.
  const baseMs = Date.UTC(new Date().getUTCFullYear(), 0, 1, 3, 0) + 60_000;
  const conflictsBefore = await statusSum(nodes, ['wsrep_local_cert_failures', 'wsrep_local_bf_aborts']);
  const children = nodes.map((node) => startClaimChild(nodeUrl(layout, node), node.n, scheduleId, baseMs));
  for (let k = 0; k < dueTimes; k++) {
    await Promise.all(children.map((c) => c.ready(k)));
    for (const c of children) c.go();
  }
  const results = await Promise.all(children.map((c) => c.result));
  const conflicts =
    (await statusSum(nodes, ['wsrep_local_cert_failures', 'wsrep_local_bf_aborts'])) - conflictsBefore;
  const rows = await onNode<{ id: number; owner: string }[]>(
    nodes[1]!,
    'SELECT id, owner FROM job_runs WHERE schedule_id = ?',
    [scheduleId],
  );
  const groups = await onNode<{ n: bigint }[]>(
    nodes[2]!,
    'SELECT COUNT(*) AS n FROM job_runs WHERE schedule_id = ? GROUP BY due_at, category_id HAVING COUNT(*) > 1',
    [scheduleId],
  );
  // The drill's runs and schedule go again: they were claimed to be counted, not to be run.
  await onNode(node1, 'DELETE FROM job_runs WHERE schedule_id = ?', [scheduleId]);
  await onNode(node1, 'DELETE FROM report_schedules WHERE id = ?', [scheduleId]);
  const claimedIds = results.flatMap((r) => r.claimed);
  const distinct = new Set(claimedIds);
  const expected = dueTimes * categories;
  const errors = results.flatMap((r) => r.errors.map((e) => `node ${r.node}: ${e}`));
  const pass =
    rows.length === expected &&
    claimedIds.length === expected &&
    distinct.size === expected &&
    rows.every((r) => distinct.has(Number(r.id))) &&
    groups.length === 0 &&
    errors.length === 0;
  return {
    name: 'scheduled runs claimed exactly once across nodes',
    pass,
    figures:
      `${dueTimes} due times × ${categories} categories = ${expected} runs; 3 processes (one per node) tried ` +
      `${3 * expected} claims; runs in job_runs: ${rows.length}; claimed per node: ` +
      results.map((r) => `node ${r.node} ${r.claimed.length}`).join(', ') +
      `; claimed twice: ${claimedIds.length - distinct.size}; (due time, category) pairs with more than one run: ${groups.length}; ` +
      `Galera certification failures and brute-force aborts during the claims: ${conflicts}; errors: ${errors.length}` +
      (errors.length > 0 ? ` (${errors.slice(0, 3).join(' | ')})` : ''),
  };
}

/* ---------- check 2: sessions ---------- */

async function checkSessions(servers: Server[], client: Client): Promise<{ check: Check; token: string }> {
  const [s1, s2, s3] = servers as [Server, Server, Server];
  const csrf = await client.call(s1.url, 'GET', '/api/auth/csrf');
  client.csrf = (csrf.json as { csrfToken: string }).csrfToken;
  const signIn = await client.call(s1.url, 'POST', '/api/auth/sign-in', {
    email: 'ada.admin@demo.ballast.test',
    password: 'demo-admin-pass',
  });
  if (signIn.status !== 200)
    throw new Error(`Sign-in on server 1 answered ${signIn.status}: ${JSON.stringify(signIn.json)}`);
  client.csrf = (signIn.json as { csrfToken: string }).csrfToken;
  const seen: string[] = [];
  for (const s of servers) {
    const me = await client.call(s.url, 'GET', '/api/me');
    seen.push(
      `server ${s.n} (node ${s.n}): ${me.status} ${(me.json as { email?: string } | null)?.email ?? ''}`,
    );
  }
  // A token made through server 2 with the session from server 1 (its CSRF token too).
  const made = await client.call(s2.url, 'POST', '/api/admin/tokens', { name: 'Cluster drill', role: 'ops' });
  const token = (made.json as { secret?: string } | null)?.secret ?? '';
  seen.push(`token made on server 2: ${made.status}`);
  // Signing out on server 3 ends the session on server 1 too.
  const other = new Client();
  other.cookie = client.cookie;
  other.csrf = client.csrf;
  const out = await other.call(s3.url, 'POST', '/api/auth/sign-out');
  const after = await client.call(s1.url, 'GET', '/api/me');
  seen.push(`signed out on server 3: ${out.status}; then /api/me on server 1: ${after.status}`);
  const pass =
    seen.slice(0, 3).every((l) => l.includes(': 200 ada.admin@demo.ballast.test')) &&
    made.status === 201 &&
    token.length > 0 &&
    out.status === 204 &&
    after.status === 401;
  return { check: { name: 'sessions valid on every server', pass, figures: seen.join('; ') }, token };
}

/* ---------- check 3: an import across the loss of its node ---------- */

function reviewRows(from: number, count: number): unknown[] {
  const rows: unknown[] = [];
  for (let i = from; i < from + count; i++)
    rows.push({
      reviewId: `drill-${String(i).padStart(6, '0')}`,
      sku: `DRILL-${String(i % 40).padStart(3, '0')}`,
      title: `Drill kettle ${i % 40}`,
      category: 'kettles-and-brewers',
      stars: 1 + (i % 5),
      reviewedAt: '2026-06-01',
      helpfulYes: i % 7,
    });
  return rows;
}

async function checkImport(
  servers: Server[],
  nodes: ClusterNode[],
  token: string,
): Promise<{ check: Check; killedAt: number }> {
  const client = new Client();
  const auth = { authorization: `Bearer ${token}` };
  let current = 0;
  let failovers = 0;
  let insertedSum = 0;
  let killedAt = 0;
  const notes: string[] = [];
  const batches = ingestRows / ingestBatch;
  for (let b = 0; b < batches; b++) {
    const body = { mode: 'valid_rows', rows: reviewRows(b * ingestBatch, ingestBatch) };
    let kill: Promise<void> | null = null;
    if (b === killAtBatch) {
      // Node 1 dies while this batch is on its way to server 1.
      kill = sleep(30).then(() => killNode(nodes[0]!));
      killedAt = Date.now();
    }
    for (let attempt = 1; ; attempt++) {
      const server = servers[current]!;
      let outcome: string;
      try {
        const res = await client.call(server.url, 'POST', '/api/ingest/reviews', body, auth);
        if (res.status === 200) {
          insertedSum += (res.json as { rowsInserted: number }).rowsInserted;
          break;
        }
        outcome = `answered ${res.status}`;
      } catch (err) {
        outcome = `failed (${err instanceof Error ? err.message : String(err)})`;
      }
      if (attempt >= 6) throw new Error(`Batch ${b + 1} could not be imported on any server: ${outcome}`);
      notes.push(
        `batch ${b + 1} on server ${server.n} ${outcome}; sent again to server ${((current + 1) % 3) + 1}`,
      );
      current = (current + 1) % servers.length;
      failovers++;
    }
    await kill;
  }
  const [counted] = await onNode<{ n: bigint; distinct_ids: bigint }[]>(
    nodes[1]!,
    "SELECT COUNT(*) AS n, COUNT(DISTINCT external_id) AS distinct_ids FROM reviews WHERE external_id LIKE 'drill-%'",
  );
  const n = Number(counted!.n);
  const distinctIds = Number(counted!.distinct_ids);
  const pass = failovers >= 1 && n === ingestRows && distinctIds === ingestRows && insertedSum <= ingestRows;
  return {
    killedAt,
    check: {
      name: 'an import survives the loss of the node it writes to',
      pass,
      figures:
        `${batches} requests of ${ingestBatch} rows; node 1 killed (SIGKILL) during request ${killAtBatch + 1}; ` +
        `${notes.join('; ') || 'no request failed'}; reviews stored: ${n} of ${ingestRows} sent, distinct review ids ${distinctIds}; ` +
        `rows counted as inserted by the answered requests: ${insertedSum} (a request whose answer was lost may have committed; its retry then inserts nothing)`,
    },
  };
}

/* ---------- check 4: rejoin, nothing lost ---------- */

const comparedTables = [
  'reviews',
  'items',
  'categories',
  'users',
  'api_tokens',
  'import_batches',
  'report_schedules',
];

async function checkRejoin(
  layout: ClusterLayout,
  nodes: ClusterNode[],
  servers: Server[],
  killedAt: number,
): Promise<Check> {
  const downFor = seconds(killedAt);
  const started = Date.now();
  await startNode(layout, nodes[0]!, false, 3, 120_000);
  for (const node of nodes) await waitSynced(node, 3, 60_000);
  const rejoined = seconds(started);
  // Server 1 answers again once its pool reconnects to node 1.
  const healthDeadline = Date.now() + 30_000;
  let health = 0;
  while (Date.now() < healthDeadline) {
    health = await fetch(`${servers[0]!.url}/api/health`, { signal: AbortSignal.timeout(5_000) })
      .then((r) => r.status)
      .catch(() => 0);
    if (health === 200) break;
    await sleep(250);
  }
  const figures: string[] = [];
  let same = true;
  for (const table of comparedTables) {
    const perNode: string[] = [];
    for (const node of nodes) {
      const [c] = await onNode<{ n: bigint }[]>(node, `SELECT COUNT(*) AS n FROM \`${table}\``);
      const [sum] = await onNode<{ Checksum: bigint | null }[]>(node, `CHECKSUM TABLE \`${table}\``);
      perNode.push(`${Number(c!.n)}/${String(sum!.Checksum)}`);
    }
    if (new Set(perNode).size !== 1) same = false;
    figures.push(`${table} ${new Set(perNode).size === 1 ? perNode[0] : perNode.join(' ≠ ')}`);
  }
  const states = await Promise.all(nodes.map((n) => nodeState(n)));
  const allSynced = states.every((s) => s.state === 'Synced' && s.clusterSize === 3);
  return {
    name: 'a killed node rejoins with no row lost',
    pass: same && allSynced && health === 200,
    figures:
      `node 1 was down ${downFor}, rejoined and Synced in ${rejoined}; server 1 health after rejoin: ${health}; ` +
      `states: ${states.map((s) => `node ${s.n} ${s.state} (size ${s.clusterSize})`).join(', ')}; ` +
      `rows/CHECKSUM TABLE, equal on all three nodes: ${figures.join('; ')}`,
  };
}

/* ---------- the drill ---------- */

export async function run(): Promise<boolean> {
  const started = Date.now();
  ensureSystemPackages(clusterNeeds, say);
  const dir = path.join(rootDir, '.data', `drill-${process.pid}`);
  const sqlPort = await freePort();
  // Own ports, away from `npm run cluster` (3411–3413, 4567–4588) so both can run at once.
  const layout: ClusterLayout = {
    dir,
    sqlPort: 13400 + (sqlPort % 500) * 3,
    galeraPort: 24567 + (sqlPort % 300) * 30,
    database: 'ballast',
    // Galera retries an autocommit statement that failed certification once by itself; off here, so a
    // conflict between two claims reaches Ballast as the deadlock error (1213) it must take as a lost claim.
    extraSettings: ['wsrep_retry_autocommit=0'],
  };
  const nodes = nodesOf(layout);
  const servers: Server[] = [];
  let cleaned = false;
  let booting: Promise<Server[]> | null = null;
  const cleanup = async (): Promise<void> => {
    if (cleaned) return;
    cleaned = true;
    // A server still booting is waited for (its start is bounded), so that it is stopped too.
    await booting?.catch(() => undefined);
    await Promise.all(servers.map((s) => stopServer(s)));
    await stopCluster(layout).catch(() => undefined);
    for (const node of nodes) await killNode(node).catch(() => undefined);
    rmSync(dir, { recursive: true, force: true });
  };
  const onSignal = (): void => {
    say('Interrupted; stopping the servers and the cluster...');
    void cleanup().finally(() => process.exit(130));
  };
  process.once('SIGINT', onSignal);
  process.once('SIGTERM', onSignal);
  const checks: Check[] = [];
  try {
    let t = Date.now();
    await startCluster(layout, say);
    say(`Cluster of 3 Synced in ${seconds(t)} (SQL ports ${nodes.map((n) => n.sqlPort).join(', ')}).`);

    t = Date.now();
    const { openDatabase, closeDatabase } = await import('../db/sequelize');
    const { migrateUp } = await import('../db/migrator');
    const { seedDemo } = await import('../runtime/seed');
    const { setLogLevel } = await import('../lib/logger');
    setLogLevel('warn');
    const sequelize = openDatabase(nodeUrl(layout, nodes[0]!));
    await migrateUp(sequelize);
    await seedDemo(() => {});
    await closeDatabase();
    say(`Migrated and seeded the demo accounts and categories through node 1 in ${seconds(t)}.`);

    // The servers boot while the claims run (the claims need only the database).
    const serversAt = Date.now();
    booting = Promise.all(
      nodes.map((node) =>
        startServer(node.n, nodeUrl(layout, node)).then((s) => {
          servers.push(s);
          return s;
        }),
      ),
    );
    booting.catch(() => undefined);

    const report = (check: Check): void => {
      checks.push(check);
      console.log(`${check.pass ? 'PASS' : 'FAIL'}  ${check.name}\n      ${check.figures}`);
    };
    t = Date.now();
    report(await checkClaims(layout, nodes));
    say(`(claims: ${seconds(t)})`);
    const booted = [...(await booting)].sort((a, b) => a.n - b.n);
    say(
      `Three Ballast servers up ${seconds(serversAt)} after their start: ${booted.map((s) => `server ${s.n} ${s.url} → node ${s.n}`).join(', ')}.`,
    );
    t = Date.now();
    const sessions = await checkSessions(booted, new Client());
    report(sessions.check);
    say(`(sessions: ${seconds(t)})`);
    t = Date.now();
    const imported = await checkImport(booted, nodes, sessions.token);
    report(imported.check);
    say(`(import: ${seconds(t)})`);
    t = Date.now();
    report(await checkRejoin(layout, nodes, booted, imported.killedAt));
    say(`(rejoin: ${seconds(t)})`);
  } catch (err) {
    checks.push({
      name: 'the drill ran to the end',
      pass: false,
      figures: err instanceof Error ? err.message : String(err),
    });
    console.log(`FAIL  the drill ran to the end\n      ${err instanceof Error ? err.message : String(err)}`);
    for (const s of servers)
      if (s.child.exitCode !== null) say(`server ${s.n} output:\n${s.output().slice(-2000)}`);
  } finally {
    process.off('SIGINT', onSignal);
    process.off('SIGTERM', onSignal);
    const t = Date.now();
    await cleanup();
    say(`Stopped the servers and the cluster in ${seconds(t)}.`);
  }
  const passed = checks.filter((c) => c.pass).length;
  console.log(`${passed} of ${checks.length} checks passed; the drill took ${seconds(started)}.`);
  return checks.length > 0 && passed === checks.length;
}

const childAt = process.argv.indexOf('--claim-child');
if (childAt !== -1) {
  const [url, node, scheduleId, baseMs] = process.argv.slice(childAt + 1);
  claimChild(url!, Number(node), Number(scheduleId), Number(baseMs)).then(
    () => process.exit(0),
    (err: unknown) => {
      console.error(err);
      process.exit(1);
    },
  );
}
