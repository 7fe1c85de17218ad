import path from 'node:path';
import { readFileSync } from 'node:fs';
import { setTimeout as sleep } from 'node:timers/promises';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ImportBatchRecord, IngestResult } from '../../../shared/schemas/imports-api.schema';
import type { CreatedToken } from '../../../shared/schemas/tokens.schema';
import { nulReason } from '../../../shared/schemas/import.schema';
import { rootDir } from '../../../server/config/env';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

/*
 * Every file of the bad-input corpus goes through the real upload (valid rows mode), and SQL then shows
 * that exactly its good rows were stored: each one, and nothing from a rejected row or a refused file.
 */

type Case = {
  file: string;
  kind: 'reviews' | 'aggregates';
  about: string;
  fileError?: string;
  goodRows?: number;
  rejected?: unknown[];
  stored?: string[];
  sql?: { query: string; n: number }[];
};

const dir = path.join(rootDir, 'tests/fixtures/bad-input');
const manifest = JSON.parse(readFileSync(path.join(dir, 'expected.json'), 'utf8')) as { cases: Case[] };
const cases = manifest.cases.filter((c) => !c.file.startsWith('generated:'));

let t: TestApp;
let ops: Agent;
const corpusBatches: number[] = [];

beforeAll(async () => {
  t = await setupTestApp();
  ops = await t.signIn('ops');
});
afterAll(async () => t.close());

async function rows<T>(sql: string, replacements: Record<string, unknown> = {}): Promise<T[]> {
  const [result] = (await t.db.sequelize.query(sql, { replacements })) as [T[], unknown];
  return result;
}

async function finished(id: number): Promise<ImportBatchRecord> {
  for (let i = 0; i < 600; i++) {
    const batch = (await ops.get(`/api/imports/${id}`).expect(200)).body as ImportBatchRecord;
    if (batch.status !== 'queued' && batch.status !== 'running') return batch;
    await sleep(100);
  }
  throw new Error(`import ${id} did not finish`);
}

/** How many reviews and observations there are in all, to show a refused file added none. */
async function everything(): Promise<number[]> {
  const [row] = await rows<{ r: number; a: number }>(
    'SELECT (SELECT COUNT(*) FROM reviews) AS r, (SELECT COUNT(*) FROM aggregate_observations) AS a',
  );
  return [Number(row!.r), Number(row!.a)];
}

/** What the batch stored, as review ids or `sku@observed_on`, read back by SQL. */
async function storedBy(kind: Case['kind'], batch: number): Promise<string[]> {
  const found =
    kind === 'reviews'
      ? await rows<{ k: string }>('SELECT external_id AS k FROM reviews WHERE import_batch_id = :batch', {
          batch,
        })
      : await rows<{ k: string }>(
          `SELECT CONCAT(i.sku, '@', DATE_FORMAT(a.observed_on, '%Y-%m-%d')) AS k
             FROM aggregate_observations a JOIN items i ON i.id = a.item_id WHERE a.import_batch_id = :batch`,
          { batch },
        );
  return found.map((r) => r.k).sort();
}

describe('the bad-input corpus, uploaded and read back by SQL', () => {
  for (const c of cases) {
    it(`${c.file} (${c.about}): exactly the good rows are stored`, async () => {
      // Earlier files reuse ids; remove what they stored so that every good row here is new.
      if (corpusBatches.length > 0) {
        await rows('DELETE FROM reviews WHERE import_batch_id IN (:ids)', { ids: corpusBatches });
        await rows('DELETE FROM aggregate_observations WHERE import_batch_id IN (:ids)', {
          ids: corpusBatches,
        });
      }
      const before = await everything();
      const res = await ops
        .post('/api/imports')
        .set('x-csrf-token', ops.csrf)
        .field('kind', c.kind)
        .field('mode', 'valid_rows')
        .attach('file', path.join(dir, c.file));
      if (c.fileError && res.status === 400) {
        // Refused at upload, before any batch: the file's first bytes already show the fault.
        expect((res.body as { error: { details: { code: string } } }).error.details.code).toBe(c.fileError);
        expect(await everything()).toEqual(before);
        return;
      }
      expect(res.status, JSON.stringify(res.body)).toBe(202);
      const batch = await finished((res.body as ImportBatchRecord).id);
      corpusBatches.push(batch.id);

      const stored = await storedBy(c.kind, batch.id);
      if (c.fileError) {
        expect(batch.status).toBe('failed');
        expect(stored).toEqual([]);
        return;
      }
      expect(stored).toEqual([...c.stored!].sort());
      expect(batch.rowsAccepted).toBe(c.goodRows);
      expect(batch.rowsRejected).toBe(c.rejected!.length);
      for (const check of c.sql ?? []) {
        const [row] = await rows<{ n: number }>(check.query, { batch: batch.id });
        expect(Number(row!.n), check.query).toBe(check.n);
      }
    }, 60_000);
  }

  it('never stores a NUL character, in any review or in any copy of a rejected row', async () => {
    const [row] = await rows<{ n: number }>(
      `SELECT (SELECT COUNT(*) FROM reviews WHERE INSTR(body, CHAR(0)) > 0 OR INSTR(external_id, CHAR(0)) > 0)
            + (SELECT COUNT(*) FROM import_row_errors WHERE INSTR(raw, CHAR(0)) > 0 OR INSTR(reason, CHAR(0)) > 0)
            AS n`,
    );
    expect(Number(row!.n)).toBe(0);
  });
});

describe('NUL through the ingest API', () => {
  it('is refused with the same reason as in a CSV file, and nothing of that row is stored', async () => {
    const admin = await t.signIn('admin');
    const token = await admin
      .post('/api/admin/tokens')
      .set('x-csrf-token', admin.csrf)
      .send({ name: 'NUL test', role: 'ops' })
      .expect(201);
    const row = (id: string, text: string) => ({
      reviewId: id,
      sku: 'KB-NUL',
      title: 'Keelwood Trail Kettle',
      category: 'kettles-and-brewers',
      stars: 4,
      reviewedAt: '2026-05-01T00:00:00Z',
      text,
    });
    const res = await request(t.app)
      .post('/api/ingest/reviews')
      .set('authorization', `Bearer ${(token.body as CreatedToken).secret}`)
      .send({
        kind: 'reviews',
        mode: 'valid_rows',
        rows: [row('api-nul-1', 'Boils\u0000fast'), row('api-nul-2', 'Boils fast')],
      });
    const result = res.body as IngestResult;
    expect(result.errors).toEqual([
      expect.objectContaining({ line: 1, column: 'text', reason: nulReason('text') }),
    ]);
    const stored = await rows<{ k: string }>(
      "SELECT external_id AS k FROM reviews WHERE external_id IN ('api-nul-1', 'api-nul-2')",
    );
    expect(stored.map((r) => r.k)).toEqual(['api-nul-2']);
  });
});

describe('the rejected-rows download of a large import', () => {
  it('holds the first 10,000 rejected rows and says so in its name', async () => {
    const header =
      'review_id,sku,title,category,stars,reviewed_at,helpful_yes,helpful_no,reviewer_id,reviewer_score,verified,text';
    const lines = Array.from(
      { length: 10_005 },
      (_, i) => `cap-${i},KB-CAP,Kettle,kettles-and-brewers,9,2026-05-01,0,0,,,,x`,
    );
    const res = await ops
      .post('/api/imports')
      .set('x-csrf-token', ops.csrf)
      .field('kind', 'reviews')
      .field('mode', 'valid_rows')
      .attach('file', Buffer.from([header, ...lines].join('\n') + '\n'), 'many-wrong.csv')
      .expect(202);
    const batch = await finished((res.body as ImportBatchRecord).id);
    expect(batch.rowsRejected).toBe(10_005);
    const csv = await ops.get(`/api/imports/${batch.id}/errors.csv`).expect(200);
    expect(csv.headers['content-disposition']).toBe(
      `attachment; filename="ballast-import-${batch.id}-rejected-rows-first-10000-of-10005.csv"`,
    );
    // The header and 10,000 rows, each on one line (no text here holds a line break).
    expect(csv.text.trimEnd().split('\r\n')).toHaveLength(10_001);
  }, 120_000);
});
