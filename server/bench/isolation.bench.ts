import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import { isoWeekStart } from '../../shared/iso-week';
import { startEmbeddedMariadb } from '../db/embedded-mariadb';
import { migrateUp } from '../db/migrator';
import { Category, User } from '../db/models';
import { closeDatabase, openDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { hashPassword } from '../modules/auth/auth.service';
import { importFileNow } from '../modules/imports/imports.service';
import { takeSnapshot } from '../modules/snapshots/snapshots.service';
import { freePort } from '../lib/free-port';
import { startServerProcess, type ServerProcess } from '../../tests/helpers/server-process';
import { fillCategory, signIn } from './standings.bench';

const HEAVY = 6;
const SECONDS = 10;

function rssMb(pid: number): number {
  const line = readFileSync(`/proc/${pid}/status`, 'utf8')
    .split('\n')
    .find((l) => l.startsWith('VmRSS:'));
  return Number(line?.replace(/\D+/g, '') ?? 0) / 1024;
}

async function latency(url: string, cookie: string) {
  const r = await autocannon({ url, connections: 4, duration: SECONDS, headers: { cookie } });
  return { p50: r.latency.p50, p99: r.latency.p99, errors: r.errors + r.non2xx + r.timeouts };
}

/**
 * A second category of 500 items with a snapshot of a week the bench category has none of (its weeks end
 * at 2026-W48), so the digest is of these 500 items alone and no portfolio digest is rendered with it.
 */
async function digestCategory(dir: string, slug: string): Promise<string> {
  const isoWeek = '2024-W30';
  const day = new Date(isoWeekStart(isoWeek).getTime() + 86_400_000).toISOString().slice(0, 10);
  const lines = ['sku,title,category,observed_on,review_count,mean_stars'];
  for (let i = 0; i < 500; i++)
    lines.push(
      `DG-${String(i).padStart(4, '0')},Digest item ${i},${slug},${day},${(i * 37) % 400},${(1 + ((i * 131) % 400) / 100).toFixed(2)}`,
    );
  const file = path.join(dir, 'digest-aggregates.csv');
  writeFileSync(file, `${lines.join('\n')}\n`);
  await importFileNow(file, 'aggregates', 'valid_rows');
  const category = await Category.findOne({ where: { slug } });
  await takeSnapshot({ categoryId: category!.id, isoWeek });
  return isoWeek;
}

/**
 * Issue 15 point 2 on a real Ballast process: /api/health and a standings page, p50/p99 idle and while,
 * at the same time, six maximum-size (200,000-item) score requests, a preview of a 200 KB file of one line
 * and the rendering of a 500-item digest keep running; beside the aims (health p99 within 2x idle,
 * standings within 1.5x, server RSS under 600 MB).
 */
export async function run(): Promise<void> {
  setLogLevel('silent');
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ballast-bench-isolation-'));
  const mariadb = await startEmbeddedMariadb({ dir, port: await freePort(), database: 'ballast_iso' });
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
    const password = 'isolation-bench-password';
    await User.create({
      email: 'bench.analyst@bench.ballast.test',
      name: 'Bench analyst',
      role: 'analyst',
      passwordHash: await hashPassword(password),
      lockedUntil: null,
      lastLoginAt: null,
    });
    await User.create({
      email: 'bench.admin@bench.ballast.test',
      name: 'Bench admin',
      role: 'admin',
      passwordHash: await hashPassword(password),
      lockedUntil: null,
      lastLoginAt: null,
    });
    await fillCategory(sequelize, category.id);
    await Category.create({ slug: 'bench-digest', name: 'Bench Digest', description: '', settings: {} });
    const isoWeek = await digestCategory(dir, 'bench-digest');
    await closeDatabase();
    // Six heavy requests from one analyst all run (or wait) instead of most being refused with 429.
    server = await startServerProcess(mariadb.url, {
      NODE_ENV: 'production',
      SESSION_SECRET: 'isolation-bench-secret-of-ballast',
      BALLAST_SCHEDULER: 'false',
      BALLAST_DEMO: 'false',
      BALLAST_HEAVY_PER_PRINCIPAL: String(HEAVY),
      // Room in the queue for the preview beside the six score requests (digests wait, never refused).
      BALLAST_WORKER_QUEUE: String(HEAVY + 1),
    });
    const base = server.url;
    const pid = server.child.pid!;
    const cookie = await signIn(base, 'bench.analyst@bench.ballast.test', password);
    const csrfOf = async (c: string) =>
      (
        (await (await fetch(`${base}/api/auth/csrf`, { headers: { cookie: c } })).json()) as {
          csrfToken: string;
        }
      ).csrfToken;
    const csrfToken = await csrfOf(cookie);
    const admin = await signIn(base, 'bench.admin@bench.ballast.test', password);
    const adminCsrf = await csrfOf(admin);
    const healthUrl = `${base}/api/health`;
    const standingsUrl = `${base}/api/categories/bench-category/standings?page=1&pageSize=50`;
    for (const u of [healthUrl, standingsUrl]) {
      const res = await fetch(u, { headers: { cookie } });
      if (!res.ok) throw new Error(`${u} answered ${res.status}`);
    }

    const idleHealth = await latency(healthUrl, cookie);
    const idleStandings = await latency(standingsUrl, cookie);

    const body = JSON.stringify({
      items: Array.from({ length: 200_000 }, (_, i) => ({
        sku: `s${i}`,
        count: (i * 7919) % 500,
        mean: 1 + ((i * 104_729) % 400) / 100,
      })),
    });
    // One line of 200 KB: a header that never ends, as a mistaken export might produce.
    const oneLine =
      'sku,title,' +
      Array.from({ length: 20_000 }, (_, i) => `c${i}`)
        .join(',')
        .slice(0, 200_000);
    let loading = true;
    let scored = 0;
    let previewed = 0;
    let digested = 0;
    const refused: number[] = [];
    const failed: string[] = [];
    const onePreview = async (): Promise<void> => {
      while (loading) {
        const form = new FormData();
        form.set('kind', 'reviews');
        form.set('file', new Blob([oneLine], { type: 'text/csv' }), 'one-line.csv');
        const res = await fetch(`${base}/api/imports/preview`, {
          method: 'POST',
          headers: { cookie: admin, 'x-csrf-token': adminCsrf },
          body: form,
        });
        await res.arrayBuffer();
        if (res.ok) previewed += 1;
        else failed.push(`preview ${res.status}`);
      }
    };
    const oneDigest = async (): Promise<void> => {
      while (loading) {
        const res = await fetch(`${base}/api/digests/produce`, {
          method: 'POST',
          headers: { cookie: admin, 'x-csrf-token': adminCsrf, 'content-type': 'application/json' },
          body: JSON.stringify({ isoWeek, categories: ['bench-digest'], mail: false }),
        });
        const answer = (await res.json()) as { digests?: { category: string | null }[] };
        if (res.ok && answer.digests?.some((d) => d.category === 'bench-digest')) digested += 1;
        else failed.push(`digest ${res.status}`);
      }
    };
    const oneHeavy = async (): Promise<void> => {
      while (loading) {
        const res = await fetch(`${base}/api/score`, {
          method: 'POST',
          headers: { cookie, 'x-csrf-token': csrfToken, 'content-type': 'application/json' },
          body,
        });
        await res.arrayBuffer();
        if (res.ok) scored += 1;
        else refused.push(res.status);
      }
    };
    let peak = rssMb(pid);
    const sampler = setInterval(() => (peak = Math.max(peak, rssMb(pid))), 250);
    const heavy = [...Array.from({ length: HEAVY }, () => oneHeavy()), onePreview(), oneDigest()];
    // Let every heavy request reach the server before measuring.
    while (((await (await fetch(healthUrl)).json()) as { heavy: { running: number } }).heavy.running < 1)
      await new Promise((resolve) => setTimeout(resolve, 100));
    const loadHealth = await latency(healthUrl, cookie);
    const loadStandings = await latency(standingsUrl, cookie);
    loading = false;
    await Promise.all(heavy);
    clearInterval(sampler);

    const verdict = (pass: boolean) => (pass ? 'PASS' : 'MISS');
    const line = (name: string, idle: { p99: number; p50: number }, load: typeof idle, aim: number) => {
      const ratio = load.p99 / Math.max(idle.p99, 1);
      console.log(
        `${name.padEnd(9)} idle p50 ${idle.p50} ms p99 ${idle.p99} ms | under load p50 ${load.p50} ms p99 ${load.p99} ms` +
          ` | p99 ${ratio.toFixed(2)}x idle, aim <= ${aim}x: ${verdict(ratio <= aim)}`,
      );
    };
    line('health', idleHealth, loadHealth, 2);
    line('standings', idleStandings, loadStandings, 1.5);
    console.log(`server RSS peak ${peak.toFixed(0)} MB | aim < 600 MB: ${verdict(peak < 600)}`);
    console.log(
      `load: ${scored} max-size score answers, ${previewed} previews of the 200 KB line, ${digested} 500-item digests; ` +
        `refused scores: ${refused.length ? refused.join(', ') : 'none'}; failed: ${failed.length ? failed.join(', ') : 'none'}; ` +
        `errors idle/load health ${idleHealth.errors}/${loadHealth.errors}, standings ${idleStandings.errors}/${loadStandings.errors}`,
    );
  } finally {
    await server?.stop();
    await mariadb.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}
