import { readFile } from 'node:fs/promises';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IngestResult } from '../../../shared/schemas/imports-api.schema';
import type { CreatedToken } from '../../../shared/schemas/tokens.schema';
import { rootDir } from '../../../server/config/env';
import { generateDemoScenario } from '../../../server/demo/scenario';
import { loadDemoReviews } from '../../../server/runtime/seed';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

const sample = async (name: string) =>
  JSON.parse(await readFile(path.join(rootDir, 'templates', 'imports', name), 'utf8')) as {
    kind: string;
    rows: Record<string, unknown>[];
  };

let t: TestApp;
let admin: Agent;
let secret: string;

beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
  const res = await admin
    .post('/api/admin/tokens')
    .set('x-csrf-token', admin.csrf)
    .send({ name: 'Ingest test', role: 'ops' })
    .expect(201);
  secret = (res.body as CreatedToken).secret;
});
afterAll(async () => t.close());

const ingest = (kind: 'reviews' | 'aggregates', body: object) =>
  request(t.app).post(`/api/ingest/${kind}`).set('authorization', `Bearer ${secret}`).send(body);

async function count(sql: string): Promise<number> {
  const row = (await t.db.sequelize.query(sql, { plain: true })) as { n: number };
  return Number(row.n);
}

describe('the demo scenario', () => {
  it('goes in through the import service as one demo batch, and loading it again adds nothing', async () => {
    const asOf = new Date('2026-11-30T00:00:00Z');
    const before = await count('SELECT COUNT(*) AS n FROM reviews');
    const inserted = await loadDemoReviews(() => {}, asOf);
    expect(inserted).toBe(generateDemoScenario({ asOf }).reviews.length);
    const batch = (await t.db.sequelize.query(
      "SELECT status, rows_read, rows_inserted FROM import_batches WHERE source = 'demo' ORDER BY id LIMIT 1",
      { plain: true },
    )) as { status: string; rows_read: number; rows_inserted: number };
    expect(batch).toEqual({ status: 'succeeded', rows_read: inserted, rows_inserted: inserted });
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before + inserted);
    expect(await loadDemoReviews(() => {}, asOf)).toBe(0);
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before + inserted);
    // The whole demo scenario goes in twice: a bound with room for a CI machine whose cores are both busy.
  }, 180_000);
});

describe('POST /api/ingest/reviews and /api/ingest/aggregates', () => {
  it('takes the JSON samples from templates/ with a token, and a second time changes nothing', async () => {
    const reviews = await sample('reviews.sample.json');
    const first = await ingest('reviews', reviews).expect(200);
    expect(first.body).toMatchObject({
      status: 'succeeded',
      rowsRead: 4,
      rowsAccepted: 4,
      rowsInserted: 4,
      errors: [],
    });
    const again = await ingest('reviews', reviews).expect(200);
    expect(again.body).toMatchObject({ rowsAccepted: 4, rowsInserted: 0, rowsUpdated: 0 });

    const aggregates = await sample('aggregates.sample.json');
    const agg = await ingest('aggregates', aggregates).expect(200);
    expect(agg.body).toMatchObject({ status: 'succeeded', rowsRead: 3, rowsInserted: 3 });
    const changed = structuredClone(aggregates);
    changed.rows[0]!.reviewCount = 57;
    changed.rows[0]!.histogram = [1, 0, 3, 13, 40];
    changed.rows[0]!.meanStars = 4.596;
    const update = await ingest('aggregates', changed).expect(200);
    expect(update.body).toMatchObject({ rowsInserted: 0, rowsUpdated: 1 });
  });

  it('answers 422 with every row error and writes nothing in all-or-nothing mode', async () => {
    const before = await count('SELECT COUNT(*) AS n FROM reviews');
    const rows = [
      {
        reviewId: 'j-1',
        sku: 'GT-J1',
        title: 'Json Tool',
        category: 'garden-tools',
        stars: 5,
        reviewedAt: '2026-05-01',
      },
      { reviewId: 'j-2', sku: 'GT-J1', category: 'garden-tools', stars: 0, reviewedAt: '2026-05-02' },
      { reviewId: 'j-3', sku: 'GT-J1', category: 'garden-tools', stars: 'five', reviewedAt: '2026-05-02' },
      { reviewId: 'j-4', sku: 'GT-J1', category: 'garden-tools', stars: 4, reviewedAt: '2099-01-01' },
      {
        reviewId: 'j-5',
        sku: 'GT-J1',
        category: 'garden-tools',
        stars: 4,
        reviewedAt: '2026-05-02',
        helpfulYes: -1,
      },
      { reviewId: 'j-1', sku: 'GT-J1', category: 'garden-tools', stars: 4, reviewedAt: '2026-05-03' },
      { reviewId: 'j-6', category: 'garden-tools', stars: 4, reviewedAt: '2026-05-03' },
      {
        reviewId: 'j-7',
        sku: 'GT-J1',
        category: 'garden-tools',
        stars: 4,
        reviewedAt: '2026-05-03',
        colour: 'red',
      },
    ];
    const res = await ingest('reviews', { mode: 'all_or_nothing', rows }).expect(422);
    const body = res.body as IngestResult;
    expect(body).toMatchObject({ status: 'rejected', rowsRead: 8, rowsAccepted: 0, rowsRejected: 7 });
    expect(body.errors.map(({ line, column, reason }) => ({ line, column, reason }))).toEqual([
      { line: 2, column: 'stars', reason: 'stars must be a whole number from 1 to 5' },
      { line: 3, column: 'stars', reason: 'stars must be a whole number from 1 to 5' },
      { line: 4, column: 'reviewedAt', reason: 'reviewedAt is in the future' },
      { line: 5, column: 'helpfulYes', reason: 'helpfulYes must be a whole number, 0 or more' },
      { line: 6, column: 'reviewId', reason: 'review_id already appeared on row 1' },
      { line: 7, column: 'sku', reason: 'sku is missing' },
      { line: 8, reason: expect.stringContaining('colour') as unknown as string },
    ]);
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before);

    const valid = await ingest('reviews', { mode: 'valid_rows', rows }).expect(200);
    expect(valid.body).toMatchObject({
      status: 'succeeded',
      rowsAccepted: 1,
      rowsRejected: 7,
      rowsInserted: 1,
    });
    expect(await count('SELECT COUNT(*) AS n FROM reviews')).toBe(before + 1);
  });

  it('refuses an empty or oversized request and the wrong kind', async () => {
    expect((await ingest('reviews', { rows: [] }).expect(400)).body.error.message).toContain('rows is empty');
    const many = Array.from({ length: 5_001 }, (_, i) => ({ reviewId: `m-${i}` }));
    expect((await ingest('reviews', { rows: many }).expect(400)).body.error.message).toContain(
      'at most 5000 rows',
    );
    expect(
      (await ingest('reviews', { kind: 'aggregates', rows: [{}] }).expect(400)).body.error.message,
    ).toContain('/api/ingest/aggregates');
  });

  it('lets a signed-in manager ingest into their own categories only', async () => {
    const manager = await t.signIn('manager');
    const res = await manager
      .post('/api/ingest/reviews')
      .set('x-csrf-token', manager.csrf)
      .send({
        mode: 'valid_rows',
        rows: [
          {
            reviewId: 'mj-1',
            sku: 'KB-J1',
            title: 'Kettle J',
            category: 'kettles-and-brewers',
            stars: 4,
            reviewedAt: '2026-05-01',
          },
          {
            reviewId: 'mj-2',
            sku: 'GT-J9',
            title: 'Tool J',
            category: 'garden-tools',
            stars: 4,
            reviewedAt: '2026-05-01',
          },
        ],
      })
      .expect(200);
    expect(res.body.errors).toEqual([
      {
        line: 2,
        column: 'category',
        reason: 'not one of your categories: garden-tools',
        raw: 'mj-2,GT-J9,garden-tools',
      },
    ]);
  });

  it('is documented in /api/openapi.json with the row shape and bearer access', async () => {
    const doc = (await request(t.app).get('/api/openapi.json').expect(200)).body as {
      paths: Record<
        string,
        Record<string, { requestBody: { content: Record<string, { schema: unknown }> }; description: string }>
      >;
    };
    const op = doc.paths['/api/ingest/reviews']!.post!;
    expect(op.description).toContain('Authorization: Bearer');
    const schema = op.requestBody.content['application/json']!.schema as {
      properties: { rows: { items: { properties: Record<string, unknown>; required: string[] } } };
    };
    expect(Object.keys(schema.properties.rows.items.properties)).toContain('reviewedAt');
    expect(schema.properties.rows.items.required).toEqual(
      expect.arrayContaining(['reviewId', 'sku', 'stars']),
    );
  });
});
