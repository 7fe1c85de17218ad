import { mkdtempSync, rmSync } from 'node:fs';
import type { Server } from 'node:http';
import os from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import { isoWeekEnd, shiftIsoWeek } from '../../shared/iso-week';
import { scoreCategory, type CountMeanInput, type PreviousRankingEntry } from '../../shared/scoring';
import { createApp } from '../app';
import { loadConfig } from '../config/env';
import { startEmbeddedMariadb } from '../db/embedded-mariadb';
import { migrateUp } from '../db/migrator';
import { Category, User } from '../db/models';
import { closeDatabase, openDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { hashPassword } from '../modules/auth/auth.service';
import { freePort } from '../lib/free-port';

const ITEMS = 5000;
const WEEKS = 104;
const CONNECTIONS = 32;
const DURATION_S = 10;

function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const rowColumns =
  'snapshot_id,item_id,n,raw_mean,smoothed,lower_bound,naive_rank,smoothed_rank,drift,naive_movement,smoothed_movement,' +
  'newest_age_days,median_age_days,recent_share,decayed_mean,effective_count,helpful_mean,reviewer_mean,one_star_share,' +
  'stale,thin,negative_cluster,reviews_to_pass,details';

/**
 * A synthetic 5,000-item category with 104 weekly snapshots, scored week by week with the shared engine
 * (counts grow, means wander) and written with multi-row inserts.
 */
export async function fillCategory(
  sequelize: ReturnType<typeof openDatabase>,
  categoryId: number,
): Promise<string> {
  const rand = mulberry32(0xba11a57);
  const now = new Date();
  const itemValues = Array.from({ length: ITEMS }, (_, i) => [
    categoryId,
    `BN-${String(i).padStart(5, '0')}`,
    `Bench item ${i} ${['kettle', 'lamp', 'pack', 'bank', 'torch'][i % 5]}`,
    now,
    now,
  ]);
  for (let start = 0; start < ITEMS; start += 1000) {
    const chunk = itemValues.slice(start, start + 1000);
    await sequelize.query(
      `INSERT INTO items (category_id, sku, title, created_at, updated_at) VALUES ${chunk.map(() => '(?,?,?,?,?)').join(',')}`,
      { replacements: chunk.flat() },
    );
  }
  const [ids] = (await sequelize.query('SELECT id, sku FROM items WHERE category_id = ? ORDER BY sku', {
    replacements: [categoryId],
  })) as [{ id: number; sku: string }[], unknown];
  const idOf = new Map(ids.map((r) => [r.sku, r.id]));

  const quality = Float64Array.from({ length: ITEMS }, () => 2.5 + 2.4 * rand());
  const counts = Float64Array.from({ length: ITEMS }, () => Math.floor(Math.exp(rand() * 5)));
  const lastWeek = '2026-W48';
  let previous: PreviousRankingEntry[] | undefined;
  for (let w = WEEKS - 1; w >= 0; w--) {
    const week = shiftIsoWeek(lastWeek, -w);
    const cutoff = isoWeekEnd(week);
    const items: CountMeanInput[] = [];
    for (let i = 0; i < ITEMS; i++) {
      counts[i] = counts[i]! + (rand() < 0.3 ? Math.floor(rand() * 4) : 0);
      const n = counts[i]!;
      const mean = n === 0 ? null : Math.min(5, Math.max(1, quality[i]! + (rand() - 0.5) / Math.sqrt(n + 1)));
      items.push({ sku: ids[i]!.sku, count: n, mean });
    }
    const result = scoreCategory(items, {}, { asOf: cutoff, previous });
    const f = result.category;
    const [snapshotId] = (await sequelize.query(
      `INSERT INTO snapshots (category_id, iso_week, cutoff, taken_at, item_count, review_count, spearman_rho, kendall_tau_b,
         mean_abs_drift, max_abs_drift, stale_count, thin_count, cluster_count, params, figures)
       VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)`,
      {
        replacements: [
          categoryId,
          week,
          cutoff,
          cutoff,
          f.itemCount,
          f.reviewCount,
          f.spearmanRho,
          f.kendallTauB,
          f.meanAbsDrift,
          f.maxAbsDrift,
          f.staleCount,
          f.thinCount,
          f.negativeClusterCount,
          JSON.stringify(result.resolved),
          JSON.stringify(f),
        ],
      },
    )) as unknown as [number, unknown];
    for (let start = 0; start < result.items.length; start += 2500) {
      const chunk = result.items.slice(start, start + 2500);
      const values = chunk.flatMap((r, k) => [
        snapshotId,
        idOf.get(r.sku),
        r.n,
        r.rawMean,
        r.smoothed,
        r.lowerBound,
        r.naiveRank,
        r.smoothedRank,
        r.drift,
        r.naiveMovement,
        r.smoothedMovement,
        (start + k) % 700,
        ((start + k) % 700) * 2,
        r.recentShare,
        r.decayedMean,
        r.effectiveCount,
        r.helpfulWeightedMean,
        r.reviewerWeightedMean,
        r.oneStarShare,
        (start + k) % 700 > 365,
        r.thin,
        (start + k) % 97 === 0,
        r.reviewsToPass,
        JSON.stringify({
          sku: r.sku,
          histogram: null,
          lowerBoundBasis: r.lowerBoundBasis,
          staleReason: (start + k) % 700 > 365 ? `newest review is ${(start + k) % 700} days old` : null,
          clusterReason: null,
          clusterObserved: null,
          clusterExpected: null,
          clusterPValue: null,
          recurringPhrases: [],
          mostHelpfulStars: null,
          mostHelpfulAt: null,
          newestAt: null,
          whatItTakes: r.whatItTakes,
          aboveSku: r.aboveSku,
          aboveScore: r.aboveScore,
        }),
      ]);
      await sequelize.query(
        `INSERT INTO snapshot_rows (${rowColumns}) VALUES ${chunk.map(() => `(${'?,'.repeat(23)}?)`).join(',')}`,
        { replacements: values },
      );
    }
    previous = result.items.map((r) => ({
      sku: r.sku,
      naiveRank: r.naiveRank,
      smoothedRank: r.smoothedRank,
    }));
  }
  return ids[Math.floor(ITEMS / 3)]!.sku;
}

export async function signIn(base: string, email: string, password: string): Promise<string> {
  const cookies = new Map<string, string>();
  const keep = (res: Response) => {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const [name, ...value] = pair!.split('=');
      cookies.set(name!, value.join('='));
    }
  };
  const header = () => [...cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  keep(csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie: header() },
    body: JSON.stringify({ email, password }),
  });
  if (!res.ok) throw new Error(`Sign-in failed: ${res.status}`);
  keep(res);
  return header();
}

type Figures = { name: string; p50: number; p99: number; rps: number; errors: number };

async function load(name: string, url: string, cookie: string): Promise<Figures> {
  const result = await autocannon({
    url,
    connections: CONNECTIONS,
    duration: DURATION_S,
    headers: { cookie, accept: 'application/json' },
  });
  const errors = result.errors + result.non2xx + result.timeouts;
  return { name, p50: result.latency.p50, p99: result.latency.p99, rps: result.requests.average, errors };
}

export async function run(): Promise<void> {
  setLogLevel('silent');
  const dir = mkdtempSync(path.join(os.tmpdir(), 'ballast-bench-standings-'));
  const mariadb = await startEmbeddedMariadb({ dir, port: await freePort(), database: 'ballast_bench' });
  let server: Server | undefined;
  try {
    const sequelize = openDatabase(mariadb.url);
    await migrateUp(sequelize);
    const category = await Category.create({
      slug: 'bench-category',
      name: 'Bench Category',
      description: '',
      settings: {},
    });
    const password = 'bench-analyst-password';
    await User.create({
      email: 'bench.analyst@bench.ballast.test',
      name: 'Bench Analyst',
      role: 'analyst',
      passwordHash: await hashPassword(password),
      lockedUntil: null,
      lastLoginAt: null,
    });
    const started = performance.now();
    const sku = await fillCategory(sequelize, category.id);
    console.log(
      `filled ${ITEMS} items × ${WEEKS} weekly snapshots (${ITEMS * WEEKS} rows) in ${((performance.now() - started) / 1000).toFixed(1)} s`,
    );

    const config = loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: mariadb.url,
      SESSION_SECRET: 'bench-secret-of-ballast',
    });
    const app = createApp({ config, sequelize });
    const port = await freePort();
    server = await new Promise<Server>((resolve) => {
      const s = app.listen(port, '127.0.0.1', () => resolve(s));
    });
    const base = `http://127.0.0.1:${port}`;
    const cookie = await signIn(base, 'bench.analyst@bench.ballast.test', password);

    const standingsUrl = `${base}/api/categories/bench-category/standings?sort=drift&dir=desc&flags=thin&driftMin=-400&q=item&page=2&pageSize=50`;
    const timelineUrl = `${base}/api/categories/bench-category/items/${sku}`;
    for (const url of [standingsUrl, timelineUrl, `${base}/api/me`]) {
      const res = await fetch(url, { headers: { cookie } });
      if (!res.ok) throw new Error(`${url} answered ${res.status}: ${await res.text()}`);
    }
    const timeline = (await (await fetch(timelineUrl, { headers: { cookie } })).json()) as {
      timeline: unknown[];
    };
    console.log(`item timeline carries ${timeline.timeline.length} weeks`);

    const trivial = await load('GET /api/me (trivial, authenticated)', `${base}/api/me`, cookie);
    const standings = await load(
      'standings (drift desc, thin, text, drift range, page 2 of 50)',
      standingsUrl,
      cookie,
    );
    const item = await load(`item timeline over ${WEEKS} weeks`, timelineUrl, cookie);
    console.log(`autocannon: ${CONNECTIONS} connections, ${DURATION_S} s each, loopback`);
    for (const f of [trivial, standings, item]) {
      console.log(
        `${f.name}: median ${f.p50.toFixed(1)} ms, p99 ${f.p99.toFixed(1)} ms, ${f.rps.toFixed(0)} req/s` +
          (f.errors ? `, ${f.errors} errors` : '') +
          (f === trivial
            ? ''
            : `; ratio to trivial: median ${(f.p50 / Math.max(trivial.p50, 0.1)).toFixed(1)}x, p99 ${(f.p99 / Math.max(trivial.p99, 0.1)).toFixed(1)}x`),
      );
    }
    (app.locals.shutdown as () => void)();
  } finally {
    if (server) {
      server.closeAllConnections();
      await new Promise((resolve) => server!.close(resolve));
    }
    // Session touches of the last answered requests finish before the pool goes.
    await new Promise((resolve) => setTimeout(resolve, 1000));
    await closeDatabase();
    await mariadb.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}
