import { setTimeout as sleep } from 'node:timers/promises';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { keyOf } from '../../../shared/keys';
import type { ImportBatchRecord, IngestResult } from '../../../shared/schemas/imports-api.schema';
import type { CreatedToken } from '../../../shared/schemas/tokens.schema';
import { createApp } from '../../../server/app';
import { loadConfig } from '../../../server/config/env';
import { createMigrator } from '../../../server/db/migrator';
import { chunkRows } from '../../../server/modules/imports/imports.writer';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let ops: Agent;
let secret: string;

beforeAll(async () => {
  t = await setupTestApp();
  ops = await t.signIn('ops');
  const admin = await t.signIn('admin');
  const res = await admin
    .post('/api/admin/tokens')
    .set('x-csrf-token', admin.csrf)
    .send({ name: 'Key identity test', role: 'ops' })
    .expect(201);
  secret = (res.body as CreatedToken).secret;
});
afterAll(async () => t.close());

const ingest = (app: TestApp['app'], kind: 'reviews' | 'aggregates', body: object) =>
  request(app).post(`/api/ingest/${kind}`).set('authorization', `Bearer ${secret}`).send(body);

async function select<T extends object>(
  sql: string,
  replacements: Record<string, unknown> = {},
): Promise<T[]> {
  return t.db.sequelize.query<T>(sql, { replacements, type: QueryTypes.SELECT });
}

async function gardenTools(): Promise<number> {
  const [row] = await select<{ id: number }>("SELECT id FROM categories WHERE slug = 'garden-tools'");
  return Number(row!.id);
}

const review = (reviewId: string, sku: string, extra: Record<string, unknown> = {}) => ({
  reviewId,
  sku,
  title: `Tool ${sku}`,
  category: 'garden-tools',
  stars: 4,
  reviewedAt: '2026-05-01',
  ...extra,
});

async function finished(id: number): Promise<ImportBatchRecord> {
  for (const deadline = Date.now() + 120_000; Date.now() < deadline;) {
    const batch = (await ops.get(`/api/imports/${id}`).expect(200)).body as ImportBatchRecord;
    if (batch.status !== 'queued' && batch.status !== 'running') return batch;
    await sleep(50);
  }
  throw new Error(`import ${id} did not finish`);
}

const uploadCsv = (csv: string, mode: string) =>
  ops
    .post('/api/imports')
    .set('x-csrf-token', ops.csrf)
    .field('kind', 'reviews')
    .field('mode', mode)
    .attach('file', Buffer.from(csv), 'keys.csv');

const nfd = (text: string) => text.normalize('NFD');

// First, while the database holds no keys that differ only in case (going back down refuses those).
describe('the migration to exact keys', () => {
  const name = '20261202230000-keys-compare-exactly';

  it('lists keys that would collide and changes nothing, then converts once they are fixed', async () => {
    const migrator = createMigrator(t.db.sequelize);
    await migrator.down({ to: name });
    const categoryId = await gardenTools();
    const insert = (sku: string) =>
      t.db.sequelize.query(
        'INSERT INTO items (category_id, sku, title, active, created_at, updated_at) VALUES (?, ?, ?, 1, NOW(), NOW())',
        { replacements: [categoryId, sku, 'Old row'] },
      );
    await insert('MG-1');
    await insert(' MG-1');
    await insert(nfd('MGÉ-2 '));
    await expect(migrator.up()).rejects.toThrow(
      /items\.sku \(category_id \d+\): id \d+ "MG-1" and id \d+ " MG-1"/,
    );
    const [column] = await select<{ c: string }>(
      "SELECT COLLATION_NAME AS c FROM information_schema.COLUMNS WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME = 'items' AND COLUMN_NAME = 'sku'",
    );
    expect(column!.c).toBe('utf8mb4_unicode_ci');

    await t.db.sequelize.query("UPDATE items SET sku = 'MG-1b' WHERE sku = ' MG-1'");
    await migrator.up();
    const collations = await select<{ t: string; col: string; c: string; n: string }>(
      `SELECT TABLE_NAME AS t, COLUMN_NAME AS col, COLLATION_NAME AS c, IS_NULLABLE AS n FROM information_schema.COLUMNS
       WHERE TABLE_SCHEMA = DATABASE() AND COLUMN_NAME IN ('slug', 'sku', 'external_id', 'reviewer_external_id')
       AND TABLE_NAME IN ('categories', 'items', 'reviews') ORDER BY t, col`,
    );
    expect(collations.map((r) => [r.t, r.col, r.c, r.n])).toEqual([
      ['categories', 'slug', 'utf8mb4_bin', 'NO'],
      ['items', 'sku', 'utf8mb4_bin', 'NO'],
      ['reviews', 'external_id', 'utf8mb4_bin', 'NO'],
      ['reviews', 'reviewer_external_id', 'utf8mb4_bin', 'YES'],
    ]);
    const fixed = await select<{ sku: string }>("SELECT sku FROM items WHERE title = 'Old row' ORDER BY sku");
    expect(fixed.map((r) => r.sku)).toEqual(['MG-1', 'MG-1b', 'MGÉ-2']);
  });
});

describe('one identity rule for keys, in code and in SQL', () => {
  // [a, b, same key?] — the rule of shared/keys.ts, stated as the expected answer.
  const pairs: [string, string, boolean][] = [
    ['R-7', 'r-7', false],
    ['CAFÉ-1', 'CAFE-1', false],
    ['CAFÉ-1', nfd('CAFÉ-1'), true],
    ['R-7', ' R-7 ', true],
    ['R-7', 'R-7\t', true],
    ['straße-1', 'strasse-1', false],
  ];

  it.each(pairs)(
    'items.sku: %j and %j are the same key: %s, by the code and by the unique key',
    async (a, b, same) => {
      const categoryId = await gardenTools();
      const insert = (sku: string) =>
        t.db.sequelize.query(
          'INSERT INTO items (category_id, sku, title, active, created_at, updated_at) VALUES (?, ?, ?, 1, NOW(), NOW())',
          { replacements: [categoryId, sku, 'Pair test'] },
        );
      const tag = `pair-${pairs.findIndex((p) => p[0] === a && p[1] === b)}-`;
      await insert(tag + keyOf(a));
      const sqlSame = await insert(tag + keyOf(b)).then(
        () => false,
        (err: { parent?: { errno?: number } }) => {
          expect(err.parent?.errno).toBe(1062);
          return true;
        },
      );
      expect(keyOf(a) === keyOf(b)).toBe(same);
      expect(sqlSame).toBe(same);
    },
  );

  it('keeps R-7 and r-7 as two reviews, and the same body again is all unchanged', async () => {
    const body = { mode: 'all_or_nothing', rows: [review('R-7', 'KI-1'), review('r-7', 'KI-1')] };
    const first = await ingest(t.app, 'reviews', body).expect(200);
    expect(first.body).toMatchObject({
      status: 'succeeded',
      rowsAccepted: 2,
      rowsInserted: 2,
      rowsUpdated: 0,
    });
    const again = await ingest(t.app, 'reviews', body).expect(200);
    expect(again.body).toMatchObject({
      status: 'succeeded',
      rowsAccepted: 2,
      rowsInserted: 0,
      rowsUpdated: 0,
    });
    const rows = await select<{ external_id: string }>(
      "SELECT r.external_id FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.sku = 'KI-1' ORDER BY r.external_id",
    );
    expect(rows.map((r) => r.external_id)).toEqual(['R-7', 'r-7']);
  });

  it('creates CAFÉ-1 beside CAFE-1, and reads an NFD sku as the NFC one', async () => {
    const res = await ingest(t.app, 'reviews', {
      rows: [review('c-1', 'CAFÉ-1'), review('c-2', 'CAFE-1'), review('c-3', nfd(' CAFÉ-1 '))],
    }).expect(200);
    expect(res.body).toMatchObject({ status: 'succeeded', rowsInserted: 3 });
    const items = await select<{ sku: string; n: number }>(
      `SELECT i.sku, COUNT(*) AS n FROM items i JOIN reviews r ON r.item_id = i.id
       WHERE i.sku IN ('CAFÉ-1', 'CAFE-1') GROUP BY i.id ORDER BY i.sku`,
    );
    expect(items.map((i) => [i.sku, Number(i.n)])).toEqual([
      ['CAFE-1', 1],
      ['CAFÉ-1', 2],
    ]);
    const category = 'garden-tools';
    // Lookups use the same rule: an NFD spelling of the sku finds the item.
    const manager = await t.signIn('admin');
    await manager
      .get(`/api/categories/${category}/items/${encodeURIComponent(nfd('CAFÉ-1'))}`)
      .expect((r) => {
        expect(r.status === 200 || r.status === 404).toBe(true);
        if (r.status === 404)
          expect((r.body as { error: { message: string } }).error.message).not.toMatch(/^The item/);
      });
  });

  it('refuses a category slug in another letter case with the reason', async () => {
    const res = await ingest(t.app, 'reviews', {
      rows: [{ ...review('g-1', 'KI-2'), category: 'Garden-Tools' }],
    });
    expect(res.status).toBe(422);
    expect((res.body as IngestResult).errors[0]?.reason).toBe(
      'category must be a slug: lowercase letters, digits and single hyphens',
    );
  });
});

describe('duplicates inside one file or one body', () => {
  it('names both rows of a review id repeated in NFD form, keeps the first and counts truly', async () => {
    const res = await ingest(t.app, 'reviews', {
      mode: 'valid_rows',
      rows: [review('Ré-1', 'KI-3'), review('x-1', 'KI-3'), review(nfd('Ré-1 '), 'KI-3', { stars: 2 })],
    }).expect(200);
    const body = res.body as IngestResult;
    expect(body).toMatchObject({ rowsAccepted: 2, rowsRejected: 1, rowsInserted: 2, rowsUpdated: 0 });
    expect(body.errors.map(({ line, reason }) => ({ line, reason }))).toEqual([
      { line: 3, reason: 'review_id already appeared on row 1' },
    ]);
    const [kept] = await select<{ stars: number }>("SELECT stars FROM reviews WHERE external_id = 'Ré-1'");
    expect(Number(kept!.stars)).toBe(4);
  });

  it('counts R-7 and r-7 in one file as 2 new, and the same file again as 0 new, 0 updated', async () => {
    const csv =
      'review_id,sku,title,category,stars,reviewed_at\n' +
      'F-7,KI-4,Tool KI-4,garden-tools,4,2026-05-01\nf-7,KI-4,,garden-tools,5,2026-05-02\n';
    const first = await finished((await uploadCsv(csv, 'all_or_nothing').expect(202)).body.id as number);
    expect(first).toMatchObject({ status: 'succeeded', rowsAccepted: 2, rowsInserted: 2, rowsUpdated: 0 });
    const again = await finished((await uploadCsv(csv, 'all_or_nothing').expect(202)).body.id as number);
    expect(again).toMatchObject({ status: 'succeeded', rowsAccepted: 2, rowsInserted: 0, rowsUpdated: 0 });
  });
});

describe('imports at the same time', () => {
  const outcomeOk = (res: request.Response) => {
    expect([200, 409], JSON.stringify(res.body)).toContain(res.status);
    if (res.status === 409)
      expect((res.body as { error: { message: string } }).error.message).toMatch(/Try again/);
  };

  it('an all-or-nothing upload and a live ingest creating the same new items both succeed', async () => {
    for (let round = 0; round < 3; round++) {
      const skus = Array.from({ length: 40 }, (_, i) => `CU-${round}-${i}`);
      const csv =
        'review_id,sku,title,category,stars,reviewed_at\n' +
        skus.map((s) => `up-${s},${s},Tool ${s},garden-tools,4,2026-05-01`).join('\n');
      const [up, live] = await Promise.all([
        uploadCsv(csv, 'all_or_nothing'),
        ingest(t.app, 'reviews', { rows: [...skus].reverse().map((s) => review(`api-${s}`, s)) }),
      ]);
      expect(up.status).toBe(202);
      outcomeOk(live);
      const batch = await finished((up.body as ImportBatchRecord).id);
      expect(batch.status, batch.errorMessage ?? '').toBe('succeeded');
      const [n] = await select<{ n: number }>(
        'SELECT COUNT(*) AS n FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.sku LIKE :p',
        { p: `CU-${round}-%` },
      );
      expect(Number(n!.n)).toBe(live.status === 200 ? 80 : 40);
    }
  });

  /** What the database and the pool are doing, for the message of a wait that ran out. */
  async function lockPicture(batchId: number): Promise<string> {
    const sessions = await select<object>(
      `SELECT p.ID, p.COMMAND, p.TIME, p.STATE, LEFT(p.INFO, 100) AS query, x.trx_state, x.trx_started
         FROM information_schema.PROCESSLIST p
         LEFT JOIN information_schema.INNODB_TRX x ON x.trx_mysql_thread_id = p.ID
        WHERE p.DB = DATABASE()`,
    );
    const [batch] = await select<object>(
      'SELECT status, rows_read, bytes_done, lease_owner, lease_until, error_message FROM import_batches WHERE id = :id',
      { id: batchId },
    );
    const pool = (
      t.db.sequelize.connectionManager as unknown as {
        pool: { size: number; available: number; using: number; waiting: number };
      }
    ).pool;
    return JSON.stringify({
      batch,
      sessions,
      pool: { size: pool.size, available: pool.available, using: pool.using, waiting: pool.waiting },
    });
  }

  it('an all-or-nothing upload finishes when another import commits one of its new items halfway', async () => {
    await ingest(t.app, 'reviews', { rows: [review('base-0', 'CH-BASE')] }).expect(200);
    const categoryId = await gardenTools();
    // The other import: it has created CH-NEW but not yet committed when the upload reaches that item.
    const other = await t.db.sequelize.transaction();
    const [[{ holder }]] = (await t.db.sequelize.query('SELECT CONNECTION_ID() AS holder', {
      transaction: other,
    })) as [[{ holder: number }], unknown];
    await t.db.sequelize.query(
      "INSERT INTO items (category_id, sku, title, active, created_at, updated_at) VALUES (?, 'CH-NEW', 'Other', 1, NOW(), NOW())",
      { replacements: [categoryId], transaction: other },
    );
    const csv =
      'review_id,sku,title,category,stars,reviewed_at\n' +
      Array.from({ length: chunkRows }, (_, i) => `ch-${i},CH-BASE,Tool,garden-tools,4,2026-05-01`).join(
        '\n',
      ) +
      '\nch-new,CH-NEW,Tool new,garden-tools,5,2026-05-02\n';
    let committed = false;
    try {
      const up = await uploadCsv(csv, 'all_or_nothing').expect(202);
      const id = (up.body as ImportBatchRecord).id;
      // Wait until the upload's second chunk waits for the uncommitted item: a lock wait of a session on this
      // file's database (other test files share the MariaDB server, their waits do not count). Should the
      // upload end before it gets there, say how at once instead of waiting out the bound.
      // MariaDB does not always mark a wait on another transaction's uncommitted unique key as LOCK WAIT in
      // INNODB_TRX (seen here: RUNNING for the whole wait), so a session of this database other than the
      // holder that is inside an INSERT INTO items counts too: the upload's only new item is CH-NEW.
      for (const deadline = Date.now() + 240_000; ; await sleep(20)) {
        const [row] = await select<{ n: number }>(
          `SELECT COUNT(*) AS n FROM information_schema.PROCESSLIST p
             LEFT JOIN information_schema.INNODB_TRX x ON x.trx_mysql_thread_id = p.ID
            WHERE p.DB = DATABASE() AND p.ID <> :holder
              AND (x.trx_state = 'LOCK WAIT' OR p.INFO LIKE 'INSERT INTO items%')`,
          { holder },
        );
        if (Number(row!.n) > 0) break;
        const [batch] = await select<{ status: string; error_message: string | null }>(
          'SELECT status, error_message FROM import_batches WHERE id = :id',
          { id },
        );
        if (batch!.status !== 'queued' && batch!.status !== 'running')
          throw new Error(
            `the upload ended before it reached the uncommitted item: ${await lockPicture(id)}`,
          );
        if (Date.now() > deadline)
          throw new Error(`the upload never reached the uncommitted item: ${await lockPicture(id)}`);
      }
      await other.commit();
      committed = true;
      const batch = await finished(id);
      expect(batch.status, batch.errorMessage ?? '').toBe('succeeded');
      expect(batch.rowsInserted).toBe(chunkRows + 1);
      const [n] = await select<{ n: number }>(
        "SELECT COUNT(*) AS n FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.sku = 'CH-NEW'",
      );
      expect(Number(n!.n)).toBe(1);
    } finally {
      if (!committed) await other.rollback();
    }
  }, 400_000);

  it('two all-or-nothing ingests on two app servers never answer 500 and lose nothing', async () => {
    const config = loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: t.db.url,
      SESSION_SECRET: 'test-secret-of-ballast',
    });
    const second = createApp({ config, sequelize: t.db.sequelize });
    try {
      for (let round = 0; round < 3; round++) {
        const skus = Array.from({ length: 60 }, (_, i) => `TW-${round}-${i}`);
        const results = await Promise.all([
          ingest(t.app, 'reviews', { rows: skus.map((s) => review(`a-${s}`, s)) }),
          ingest(second, 'reviews', { rows: [...skus].reverse().map((s) => review(`b-${s}`, s)) }),
          ingest(t.app, 'reviews', { mode: 'valid_rows', rows: skus.map((s) => review(`c-${s}`, s)) }),
        ]);
        results.forEach(outcomeOk);
        const [n] = await select<{ n: number }>(
          'SELECT COUNT(*) AS n FROM reviews r JOIN items i ON i.id = r.item_id WHERE i.sku LIKE :p',
          { p: `TW-${round}-%` },
        );
        expect(Number(n!.n)).toBe(results.filter((r) => r.status === 200).length * 60);
        const [items] = await select<{ n: number }>('SELECT COUNT(*) AS n FROM items WHERE sku LIKE :p', {
          p: `TW-${round}-%`,
        });
        expect(Number(items!.n)).toBe(results.some((r) => r.status === 200) ? 60 : 0);
      }
    } finally {
      (second.locals.shutdown as () => void)();
    }
  }, 120_000);
});
