import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { QueryTypes, Transaction } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../../server/config/env';
import { setLogLevel } from '../../../server/lib/logger';
import { seedDemo } from '../../../server/runtime/seed';
import { createTestDatabase, type TestDatabase } from '../../helpers/test-db';

/**
 * `npm run job -- snapshot` is killed with SIGKILL while it writes a snapshot: nothing of that week may
 * remain, and running the same command again completes it. So that the kill lands inside the write every
 * time, the test holds a lock on one item row: the job's insert of that item's snapshot row waits there,
 * inside the transaction that already holds the snapshot row, and is killed while it waits.
 */
const slug = 'garden-tools';
const week = '2026-W47';
/** Taken first and left alone: the killed run must not disturb another week's snapshot. */
const earlierWeek = '2026-W46';
const ITEMS = 5_000;
const REVIEWS = 100_000;

let t: TestDatabase;
let categoryId: number;
const children: ChildProcess[] = [];

async function scalar(sql: string, replacements: unknown[] = []): Promise<number> {
  const row = (await t.sequelize.query(sql, { replacements, plain: true })) as { n: number | string };
  return Number(row.n);
}

function startJob(week: string): { child: ChildProcess; output: () => string; exit: Promise<number | null> } {
  let log = '';
  const child = spawn(
    process.execPath,
    [
      '--import',
      'tsx',
      path.join(rootDir, 'server/scripts/job.ts'),
      'snapshot',
      '--category',
      slug,
      '--week',
      week,
    ],
    {
      cwd: rootDir,
      env: { ...process.env, NODE_ENV: 'test', DATABASE_URL: t.url, LOG_LEVEL: 'warn' },
      stdio: ['ignore', 'pipe', 'pipe'],
    },
  );
  children.push(child);
  child.stdout?.on('data', (d: Buffer) => (log += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (log += d.toString()));
  const exit = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  return { child, output: () => log, exit };
}

beforeAll(async () => {
  setLogLevel('silent');
  t = await createTestDatabase();
  await seedDemo(() => {}, { reviews: false });
  categoryId = await scalar('SELECT id AS n FROM categories WHERE slug = ?', [slug]);
  await t.sequelize.query(
    `INSERT INTO items (category_id, sku, title, active, created_at, updated_at)
     SELECT ?, CONCAT('KILL-', s.seq), CONCAT('Kill test item ', s.seq), 1, NOW(), NOW()
     FROM seq_1_to_${ITEMS} s`,
    { replacements: [categoryId] },
  );
  const firstItem = await scalar('SELECT MIN(id) AS n FROM items WHERE category_id = ?', [categoryId]);
  // Deterministic ratings spread over the year before the week, skewed towards 4 and 5 stars.
  await t.sequelize.query(
    `INSERT INTO reviews (item_id, external_id, stars, reviewed_at, helpful_yes, helpful_no, body, created_at, updated_at)
     SELECT ${firstItem} + (s.seq * 7919) MOD ${ITEMS}, CONCAT('kill-', s.seq),
       ELT(1 + (s.seq * 2654435761) MOD 10, 1, 2, 3, 4, 4, 4, 5, 5, 5, 5),
       TIMESTAMP('2026-11-15 12:00:00') - INTERVAL ((s.seq * 40503) MOD (365 * 86400)) SECOND,
       0, 0, NULL, NOW(), NOW()
     FROM seq_1_to_${REVIEWS} s`,
  );
}, 120_000);

afterAll(async () => {
  for (const child of children)
    if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  await t?.drop();
});

describe('SIGKILL in the middle of a snapshot', () => {
  it('leaves no partial snapshot, and a rerun completes it', async () => {
    const items = await scalar(
      'SELECT COUNT(DISTINCT item_id) AS n FROM reviews JOIN items ON items.id = item_id WHERE category_id = ?',
      [categoryId],
    );
    expect(items).toBe(ITEMS);

    // A finished snapshot of the week before, so the table the killed run writes to is not empty.
    const earlier = startJob(earlierWeek);
    expect(await earlier.exit, earlier.output()).toBe(0);
    const kept = await scalar('SELECT COUNT(*) AS n FROM snapshot_rows');
    expect(kept).toBe(ITEMS);

    // Hold a lock on one item row: the job's insert of that item's snapshot row waits on its foreign key
    // check, inside the transaction that already wrote the snapshot row.
    const hold = await t.sequelize.transaction();
    await t.sequelize.query(`SELECT id FROM items WHERE sku = 'KILL-${ITEMS}' FOR UPDATE`, {
      transaction: hold,
    });
    const job = startJob(week);
    const deadline = Date.now() + 90_000;
    // What the job's open transaction has written so far, read without waiting for its commit.
    const uncommitted = () =>
      t.sequelize.transaction(
        { isolationLevel: Transaction.ISOLATION_LEVELS.READ_UNCOMMITTED },
        async (transaction) => {
          const [row] = (await t.sequelize.query(
            `SELECT s.id, (SELECT COUNT(*) FROM snapshot_rows r WHERE r.snapshot_id = s.id) AS written
           FROM snapshots s WHERE s.category_id = ? AND s.iso_week = ?`,
            { replacements: [categoryId, week], type: QueryTypes.SELECT, transaction },
          )) as { id: number; written: number | string }[];
          return row ? Number(row.written) : undefined;
        },
      );
    let written: number | undefined;
    try {
      // Wait until the snapshot row exists and its rows stop growing: the job waits at the held row.
      for (let previous: number | undefined; ; previous = written) {
        if (job.child.exitCode !== null)
          throw new Error(`The job ended before it could be killed:\n${job.output()}`);
        if (Date.now() > deadline) throw new Error(`The job never began writing:\n${job.output()}`);
        written = await uncommitted();
        if (written !== undefined && written === previous) break;
        await sleep(written === undefined ? 50 : 500);
      }
      job.child.kill('SIGKILL');
      await job.exit;
    } finally {
      await hold.rollback();
    }
    expect(job.child.signalCode).toBe('SIGKILL');
    expect(job.output()).toContain(`${ITEMS} items`);
    expect(job.output()).not.toContain('Took snapshot');
    // The kill interrupted the transaction after it wrote the snapshot row (seen above by a dirty read)
    // and before all of its rows.
    expect(written).toBeGreaterThanOrEqual(0);
    expect(written).toBeLessThan(ITEMS);

    // MariaDB rolls the transaction back once it notices the connection is gone; until then the
    // uncommitted snapshot row is visible to a dirty read.
    const settle = Date.now() + 30_000;
    while ((await uncommitted()) !== undefined && Date.now() < settle) await sleep(50);
    expect(await uncommitted()).toBeUndefined();
    expect(
      await scalar('SELECT COUNT(*) AS n FROM snapshots WHERE category_id = ? AND iso_week = ?', [
        categoryId,
        week,
      ]),
    ).toBe(0);
    expect(await scalar('SELECT COUNT(*) AS n FROM snapshot_rows')).toBe(kept);
    expect(
      await scalar(
        'SELECT COUNT(*) AS n FROM snapshot_rows r LEFT JOIN snapshots s ON s.id = r.snapshot_id WHERE s.id IS NULL',
      ),
    ).toBe(0);
    // The killed run stays in the history as it was last seen.
    expect(await scalar(`SELECT COUNT(*) AS n FROM job_runs WHERE status = 'running'`)).toBe(1);

    const rerun = startJob(week);
    const code = await rerun.exit;
    expect(code, rerun.output()).toBe(0);
    expect(rerun.output()).toContain('succeeded');
    const snapshot = (await t.sequelize.query(
      'SELECT id, item_count, review_count FROM snapshots WHERE category_id = ? AND iso_week = ?',
      { replacements: [categoryId, week], plain: true },
    )) as { id: number; item_count: number; review_count: number } | null;
    expect(snapshot).not.toBeNull();
    expect(snapshot!.item_count).toBe(ITEMS);
    expect(snapshot!.review_count).toBe(REVIEWS);
    expect(
      await scalar('SELECT COUNT(*) AS n FROM snapshot_rows WHERE snapshot_id = ?', [snapshot!.id]),
    ).toBe(ITEMS);
    expect(await scalar('SELECT COUNT(*) AS n FROM snapshot_rows')).toBe(kept + ITEMS);
  }, 150_000);
});
