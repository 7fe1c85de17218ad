import { spawn } from 'node:child_process';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { resolveSettings, summariseReviews, type ReviewInput } from '../../../shared/scoring';
import type { ImportBatchRecord } from '../../../shared/schemas/imports-api.schema';
import { rootDir } from '../../../server/config/env';
import { Category, Item, Review, Snapshot } from '../../../server/db/models';
import { loadCategoryDigestData } from '../../../server/modules/digests/digests.service';
import { loadCategoryEvidence } from '../../../server/modules/snapshots/snapshot-evidence';
import { backfillSnapshots, takeSnapshot } from '../../../server/modules/snapshots/snapshots.service';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

/*
 * The one week boundary (shared/iso-week.ts): a week's evidence is what was reviewed strictly before the
 * Monday 00:00:00 UTC after it. Each path is checked with reviews at Sunday 23:59:59, Monday 00:00:00 and
 * Monday 00:00:01 UTC, and at the same three seconds around the start of the recent and baseline windows.
 * The runner repeats this file under TZ=Pacific/Auckland; the command-line snapshot is also run here
 * under Pacific/Auckland and America/Los_Angeles whatever the runner's zone.
 */
const W48 = '2026-W48';
const cutoff = new Date('2026-11-30T00:00:00Z'); // Monday after ISO week 2026-W48 (Mon 23 – Sun 29 Nov)
const settings = resolveSettings({});
const S = 1000;
const DAY = 86_400_000;
const at = (ms: number): string => new Date(ms).toISOString();
const recentStart = cutoff.getTime() - settings.recentWindowDays * DAY; // 2026-09-01T00:00:00Z
const baselineStart = cutoff.getTime() - (settings.clusterWindowDays + settings.clusterBaselineDays) * DAY;

const boundaryReviews: ReviewInput[] = [
  { stars: 5, reviewedAt: '2026-11-29T23:59:59.000Z' },
  { stars: 1, reviewedAt: '2026-11-30T00:00:00.000Z' },
  { stars: 1, reviewedAt: '2026-11-30T00:00:01.000Z' },
  { stars: 1, reviewedAt: at(recentStart - S) },
  { stars: 1, reviewedAt: at(recentStart) },
  { stars: 1, reviewedAt: at(recentStart + S) },
  { stars: 2, reviewedAt: at(baselineStart - S) },
  { stars: 2, reviewedAt: at(baselineStart) },
  { stars: 1, reviewedAt: at(baselineStart + S) },
];
/** What W48 holds, worked out by hand from the rule: strictly before the cut-off, windows open at their start. */
const expectedW48 = {
  n: 7, // all but the two Monday reviews
  sumStars: 5 + 1 + 1 + 1 + 2 + 2 + 1,
  recentCount: 2, // Sunday 23:59:59 and recent start + 1 s
  totalRecent: 2,
  oneStarRecent: 1,
  totalBaseline: 3, // recent start − 1 s, recent start, baseline start + 1 s
  oneStarBaseline: 3,
};

let t: TestApp;
let admin: Agent;
let categoryId: number;
const slug = 'boundary-lamps';

beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
  const category = await Category.create({ slug, name: 'Boundary Lamps', settings: {} });
  categoryId = category.id;
  const item = await Item.create({ categoryId, sku: 'BL-1', title: 'Boundary lamp', brand: null, url: null });
  await Review.bulkCreate(
    boundaryReviews.map((r, k) => ({
      itemId: item.id,
      externalId: `bl-${k}`,
      stars: r.stars,
      reviewedAt: new Date(r.reviewedAt),
      helpfulYes: 0,
      helpfulNo: 0,
      reviewerExternalId: null,
      reviewerScore: null,
      verified: null,
      body: null,
      importBatchId: null,
    })),
  );
});
afterAll(async () => t.close());

function pick(s: object) {
  const v = s as Record<string, unknown>;
  return {
    n: v.n,
    sumStars: v.sumStars,
    recentCount: v.recentCount,
    totalRecent: v.totalRecent,
    oneStarRecent: v.oneStarRecent,
    totalBaseline: v.totalBaseline,
    oneStarBaseline: v.oneStarBaseline,
  };
}

describe('the week boundary, SQL and engine', () => {
  it('counts the same reviews and windows in SQL as the engine does from the raw reviews', async () => {
    const sql = await loadCategoryEvidence(categoryId, cutoff, settings);
    const engine = summariseReviews(boundaryReviews, cutoff, settings);
    expect(pick(engine)).toEqual(expectedW48);
    expect(pick(sql.items[0]!)).toEqual(expectedW48);
    // A week later both Monday reviews count, on both sides.
    const next = new Date(cutoff.getTime() + 7 * 86_400_000);
    const sqlNext = (await loadCategoryEvidence(categoryId, next, settings)).items[0]!;
    expect(sqlNext.n).toBe(9);
    expect(pick(sqlNext)).toEqual(pick(summariseReviews(boundaryReviews, next, settings)));
  });
});

describe('snapshot, recompute, backfill, what-if and digest of the week', () => {
  it('takes W48 without the Monday reviews, and recomputing with replace gives the same', async () => {
    const now = new Date('2026-12-10T00:00:00Z');
    const first = await takeSnapshot({ categoryId, isoWeek: W48, now });
    const snapshot = (await Snapshot.findByPk(first.snapshotId))!;
    expect(snapshot.cutoff.toISOString()).toBe('2026-11-30T00:00:00.000Z');
    expect(snapshot.reviewCount).toBe(7);
    const again = await takeSnapshot({ categoryId, isoWeek: W48, now, replace: true });
    expect(again.replaced).toBe(true);
    expect((await Snapshot.findByPk(again.snapshotId))!.reviewCount).toBe(7);
  });

  it('backfills W48 with 7 reviews and W49 with all 9', async () => {
    await backfillSnapshots({
      categoryId,
      fromWeek: W48,
      toWeek: '2026-W49',
      replace: true,
      now: new Date('2026-12-10T00:00:00Z'),
    });
    const weeks = await Snapshot.findAll({ where: { categoryId }, order: [['isoWeek', 'ASC']] });
    expect(weeks.map((s) => [s.isoWeek, s.reviewCount, s.cutoff.toISOString()])).toEqual([
      [W48, 7, '2026-11-30T00:00:00.000Z'],
      ['2026-W49', 9, '2026-12-07T00:00:00.000Z'],
    ]);
  });

  it('gives the what-if the evidence of the same cut-off', async () => {
    const res = await admin.get(`/api/categories/${slug}/what-if?week=${W48}`).expect(200);
    const body = res.body as { asOf: string; items: Record<string, unknown>[] };
    expect(body.asOf).toBe('2026-11-30T00:00:00.000Z');
    expect(pick(body.items[0]!)).toEqual(expectedW48);
  });

  it('shows the digest figures of the week: 7 reviews, Monday 23 to Sunday 29 November', async () => {
    const digest = await loadCategoryDigestData(categoryId, W48);
    expect(digest.figures.reviewCount).toBe(7);
    expect([digest.weekStart, digest.weekEnd]).toEqual(['2026-11-23', '2026-11-29']);
  });
});

function job(args: string[], tz: string): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    let out = '';
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', path.join(rootDir, 'server/scripts/job.ts'), ...args],
      {
        cwd: rootDir,
        env: { ...process.env, NODE_ENV: 'test', DATABASE_URL: t.db.url, LOG_LEVEL: 'silent', TZ: tz },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (out += d.toString()));
    child.on('exit', (code) => resolve({ code, out }));
  });
}

describe('npm run job -- snapshot --replace in another zone', () => {
  it.each(['Pacific/Auckland', 'America/Los_Angeles'])(
    'counts the same 7 reviews under TZ=%s',
    async (tz) => {
      const res = await job(['snapshot', '--category', slug, '--week', W48, '--replace'], tz);
      expect(res.code, res.out).toBe(0);
      const snapshot = (await Snapshot.findOne({ where: { categoryId, isoWeek: W48 } }))!;
      expect(snapshot.cutoff.toISOString()).toBe('2026-11-30T00:00:00.000Z');
      expect(snapshot.reviewCount).toBe(7);
    },
  );
});

describe('POST /api/score at the boundary', () => {
  const reviews = [
    { stars: 5, reviewedAt: '2026-11-29T23:59:59' },
    { stars: 1, reviewedAt: '2026-11-30T00:00:00' },
    { stars: 1, reviewedAt: '2026-11-30T00:00:01' },
  ];
  it.each(['2026-11-30', '2026-11-30T00:00:00', '2026-11-30T13:00:00+13:00'])(
    'reads offset-less times as UTC and counts only Sunday’s review as of %s',
    async (asOf) => {
      const res = await admin
        .post('/api/score')
        .set('x-csrf-token', admin.csrf)
        .send({ asOf, items: [{ sku: 'BL-1', reviews }] })
        .expect(200);
      const item = (res.body as { items: { n: number; raw: number | null }[] }).items[0]!;
      expect(item.n).toBe(1);
      expect((res.body as { resolved: { asOf: string } }).resolved.asOf).toBe('2026-11-30T00:00:00.000Z');
    },
  );

  it.each([
    ['reviewedAt', '2026-02-30', '2026-02-30 is not a day in the calendar'],
    ['reviewedAt', '2026-13-01T10:00:00Z', '2026-13-01 is not a day in the calendar'],
    ['asOf', '2026-11-30T24:00:00', '24:00:00 is not a time of day'],
  ])('refuses %s %j with the reason', async (field, value, reason) => {
    const review = { stars: 5, reviewedAt: field === 'reviewedAt' ? value : '2026-11-01' };
    const body = {
      asOf: field === 'asOf' ? value : '2026-11-30',
      items: [{ sku: 'BL-1', reviews: [review] }],
    };
    const res = await admin.post('/api/score').set('x-csrf-token', admin.csrf).send(body).expect(400);
    expect(JSON.stringify(res.body)).toContain(reason);
  });
});

describe('CSV import at the boundary', () => {
  it('reads a Monday date alone as Monday 00:00 UTC, outside the week that ended, and refuses 2026-02-30 on its line', async () => {
    const csv = [
      'review_id,sku,title,category,stars,reviewed_at',
      `bi-1,BI-1,Boundary import lamp,${slug},4,2026-11-29T23:59:59`,
      `bi-2,BI-1,,${slug},1,2026-11-30`,
      `bi-3,BI-1,,${slug},1,2026-02-30`,
    ].join('\n');
    const res = await admin
      .post('/api/imports')
      .set('x-csrf-token', admin.csrf)
      .field('kind', 'reviews')
      .field('mode', 'valid_rows')
      .attach('file', Buffer.from(csv), 'boundary.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(202);
    let batch = res.body as ImportBatchRecord;
    for (let i = 0; i < 300 && (batch.status === 'queued' || batch.status === 'running'); i++) {
      await sleep(100);
      batch = (await admin.get(`/api/imports/${batch.id}`).expect(200)).body as ImportBatchRecord;
    }
    expect([batch.status, batch.rowsAccepted, batch.rowsRejected]).toEqual(['succeeded', 2, 1]);
    const errors = (await admin.get(`/api/imports/${batch.id}/errors.csv`).expect(200)).text;
    expect(errors).toContain('4,reviewed_at,');
    expect(errors).toContain('"2026-02-30"');
    const [rows] = await t.db.sequelize.query(
      "SELECT r.external_id, DATE_FORMAT(r.reviewed_at, '%Y-%m-%dT%H:%i:%s') AS at FROM reviews r WHERE r.external_id LIKE 'bi-%' ORDER BY 1",
    );
    expect(rows).toEqual([
      { external_id: 'bi-1', at: '2026-11-29T23:59:59' },
      { external_id: 'bi-2', at: '2026-11-30T00:00:00' },
    ]);
    const evidence = await loadCategoryEvidence(categoryId, cutoff, settings);
    expect(evidence.items.find((i) => i.sku === 'BI-1')?.n).toBe(1);
  });
});
