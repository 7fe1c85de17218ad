import { rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { lastCompletedIsoWeek, shiftIsoWeek } from '../../shared/iso-week';
import { startEmbeddedMariadb } from '../db/embedded-mariadb';
import { migrateUp } from '../db/migrator';
import { closeDatabase, openDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { backfillSnapshots, takeSnapshot } from '../modules/snapshots/snapshots.service';
import { freePort } from '../lib/free-port';

const REVIEWS = 1_000_000;
const ITEMS = 20_000;
const CATEGORIES = 10;
const NOW = new Date('2026-11-30T06:00:00Z');

async function timed<T>(work: () => Promise<T>): Promise<[number, T]> {
  const started = performance.now();
  const result = await work();
  return [performance.now() - started, result];
}

/**
 * The weekly snapshot of 10 categories (1,000,000 reviews over 20,000 items) against the bare
 * `SELECT item, COUNT(*), AVG(stars), MAX(reviewed_at) … GROUP BY item` over the same table and server.
 */
export async function run(): Promise<void> {
  setLogLevel('warn');
  const dir = path.join(os.tmpdir(), `ballast-snapshot-bench-${process.pid}`);
  rmSync(dir, { recursive: true, force: true });
  const mariadb = await startEmbeddedMariadb({ dir, port: await freePort(), database: 'ballast_bench' });
  try {
    const sequelize = openDatabase(mariadb.url);
    await migrateUp(sequelize);
    const [fillMs] = await timed(async () => {
      await sequelize.query(
        `INSERT INTO categories (slug, name, description, settings, created_at, updated_at)
         SELECT CONCAT('bench-', seq), CONCAT('Bench category ', seq), '', '{"clusterPhrases":["stopped working"]}', NOW(), NOW()
         FROM seq_1_to_${CATEGORIES}`,
      );
      await sequelize.query(
        `INSERT INTO items (category_id, sku, title, active, created_at, updated_at)
         SELECT c.id, CONCAT('SKU-', s.seq), CONCAT('Bench item ', s.seq), 1, NOW(), NOW()
         FROM seq_1_to_${ITEMS} s JOIN categories c ON c.slug = CONCAT('bench-', 1 + s.seq MOD ${CATEGORIES})`,
      );
      // Deterministic pseudo-random ratings: skewed towards 4 and 5 stars, spread over two years.
      await sequelize.query(
        `INSERT INTO reviews (item_id, external_id, stars, reviewed_at, helpful_yes, helpful_no, body, created_at, updated_at)
         SELECT 1 + (s.seq * 7919) MOD ${ITEMS}, CONCAT('r', s.seq),
           ELT(1 + (s.seq * 2654435761) MOD 10, 1, 2, 3, 4, 4, 4, 5, 5, 5, 5),
           TIMESTAMP('2026-11-29 23:00:00') - INTERVAL ((s.seq * 40503) MOD (730 * 86400)) SECOND,
           (s.seq * 31) MOD 7, (s.seq * 17) MOD 3,
           IF(s.seq MOD 50 = 0, 'It stopped working after a week', NULL), NOW(), NOW()
         FROM seq_1_to_${REVIEWS} s`,
      );
    });
    console.log(
      `snapshot: generated ${REVIEWS} reviews over ${ITEMS} items in ${CATEGORIES} categories (${(fillMs / 1000).toFixed(1)} s)`,
    );

    const bare = `SELECT item_id, COUNT(*), AVG(stars), MAX(reviewed_at) FROM reviews GROUP BY item_id`;
    await sequelize.query(bare); // warm the buffer pool
    const bareRuns: number[] = [];
    for (let i = 0; i < 3; i += 1) bareRuns.push((await timed(() => sequelize.query(bare)))[0]);
    const bareMs = bareRuns.sort((a, b) => a - b)[1]!;

    const [categories] = (await sequelize.query('SELECT id FROM categories ORDER BY id')) as [
      { id: number }[],
      unknown,
    ];
    const week = lastCompletedIsoWeek(NOW);
    const weeklyRuns: number[] = [];
    for (let i = 0; i < 3; i += 1) {
      const [ms] = await timed(async () => {
        for (const c of categories)
          await takeSnapshot({ categoryId: c.id, isoWeek: week, now: NOW, replace: true });
      });
      weeklyRuns.push(ms);
    }
    const weeklyMs = weeklyRuns.sort((a, b) => a - b)[1]!;
    console.log(`snapshot: bare GROUP BY over all reviews, median ${bareMs.toFixed(0)} ms`);
    console.log(
      `snapshot: full weekly snapshot of all ${CATEGORIES} categories (${week}), median ${weeklyMs.toFixed(0)} ms, ratio ${(weeklyMs / bareMs).toFixed(2)}x (aim: within 1.5x)`,
    );

    const weeks = 4;
    const [backfillMs] = await timed(async () => {
      for (const c of categories) {
        await backfillSnapshots({
          categoryId: c.id,
          fromWeek: shiftIsoWeek(week, -weeks),
          toWeek: shiftIsoWeek(week, -1),
          now: NOW,
          replace: true,
        });
      }
    });
    console.log(
      `snapshot: backfill of ${weeks} past weeks, ${(backfillMs / weeks).toFixed(0)} ms per week for all categories`,
    );
    await closeDatabase();
  } finally {
    await mariadb.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}
