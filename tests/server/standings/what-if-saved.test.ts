import { setTimeout as sleep } from 'node:timers/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ImportBatchRecord } from '../../../shared/schemas/imports-api.schema';
import type { Standings, WhatIfEvidence } from '../../../shared/schemas/standings.schema';
import { Category, Item, Review } from '../../../server/db/models';
import { takeSnapshot } from '../../../server/modules/snapshots/snapshots.service';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

/*
 * The what-if's saved side is the stored snapshot of the week it names (issue 14, point 5): after a review
 * dated inside W48 is imported, the saved side still equals the W48 standings, and the answer says the
 * evidence changed. Invented data.
 */
const W48 = '2026-W48';
const slug = 'what-if-kettles';
let t: TestApp;
let admin: Agent;
let analyst: Agent;

beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
  analyst = await t.signIn('analyst');
  const category = await Category.create({ slug, name: 'What-if Kettles', settings: {} });
  const stars = [
    [5, 5, 4, 5],
    [3, 4, 2],
    [1, 2, 2, 3, 1],
    [4, 4],
    [5, 3, 4, 4, 5, 2],
  ];
  for (const [k, list] of stars.entries()) {
    const item = await Item.create({
      categoryId: category.id,
      sku: `WK-${k + 1}`,
      title: `Kettle ${k + 1}`,
      brand: null,
      url: null,
    });
    await Review.bulkCreate(
      list.map((s, j) => ({
        itemId: item.id,
        externalId: `wk-${k}-${j}`,
        stars: s,
        reviewedAt: new Date(Date.UTC(2026, 10, 1 + j * 3 + k)),
        helpfulYes: 0,
        helpfulNo: 0,
        reviewerExternalId: null,
        reviewerScore: null,
        verified: null,
        body: null,
        importBatchId: null,
      })),
    );
  }
  // Stored times have whole seconds: the seeded reviews are dated two minutes ago and the snapshot one,
  // so the import below comes strictly after it.
  await t.db.sequelize.query(
    'UPDATE reviews SET created_at = UTC_TIMESTAMP() - INTERVAL 2 MINUTE, updated_at = created_at',
  );
  await takeSnapshot({ categoryId: category.id, isoWeek: W48, now: new Date(Date.now() - 60_000) });
});
afterAll(async () => t.close());

async function importReviews(lines: string[]): Promise<void> {
  const csv = ['review_id,sku,title,category,stars,reviewed_at', ...lines].join('\n');
  const res = await admin
    .post('/api/imports')
    .set('x-csrf-token', admin.csrf)
    .field('kind', 'reviews')
    .field('mode', 'valid_rows')
    .attach('file', Buffer.from(csv), 'late.csv');
  expect(res.status, JSON.stringify(res.body)).toBe(202);
  let batch = res.body as ImportBatchRecord;
  // Waits for the import to finish (a condition, not a count of polls).
  while (batch.status === 'queued' || batch.status === 'running') {
    await sleep(100);
    batch = (await admin.get(`/api/imports/${batch.id}`).expect(200)).body as ImportBatchRecord;
  }
  expect([batch.status, batch.rowsAccepted], JSON.stringify(batch)).toEqual(['succeeded', lines.length]);
}

function standingsFigures(s: Standings) {
  return {
    m: s.m,
    C: s.C,
    tau: s.week.kendallTauB,
    items: s.week.itemCount,
    reviews: s.week.reviewCount,
    rows: s.rows.map((r) => ({ sku: r.sku, n: r.n, smoothedRank: r.smoothedRank })),
  };
}

function savedFigures(w: WhatIfEvidence) {
  const params = w.resolved as { m: number; C: number };
  return {
    m: params.m,
    C: params.C,
    tau: w.saved.week.kendallTauB,
    items: w.saved.week.itemCount,
    reviews: w.saved.week.reviewCount,
    rows: w.saved.rows.map((r) => ({ sku: r.sku, n: r.n, smoothedRank: r.smoothedRank })),
  };
}

describe('what-if for a week starts from its snapshot', () => {
  it('says nothing changed while the evidence is the snapshot’s', async () => {
    const w = (await analyst.get(`/api/categories/${slug}/what-if?week=${W48}`).expect(200))
      .body as WhatIfEvidence;
    expect(w.evidenceChange.changed).toBe(false);
    expect(w.canRecompute).toBe(false); // analysts may not recompute; ops and admin may
  });

  it('keeps the saved side equal to the W48 standings after a review dated inside W48 arrives', async () => {
    const before = (
      await analyst.get(`/api/categories/${slug}/standings?week=${W48}&pageSize=50`).expect(200)
    ).body as Standings;
    // A one-star review on Thursday of W48 for the item ranked first, and a new item inside W48.
    await importReviews([
      `late-1,${before.rows[0]!.sku},${before.rows[0]!.title},${slug},1,2026-11-26T12:00:00`,
      `late-2,WK-9,Kettle 9,${slug},2,2026-11-27T09:00:00`,
    ]);
    const standings = (
      await analyst.get(`/api/categories/${slug}/standings?week=${W48}&pageSize=50`).expect(200)
    ).body as Standings;
    expect(standingsFigures(standings)).toEqual(standingsFigures(before));

    const res = await admin.get(`/api/categories/${slug}/what-if?week=${W48}`).expect(200);
    const w = res.body as WhatIfEvidence;
    const saved = savedFigures(w);
    expect(saved).toEqual({ ...standingsFigures(standings), rows: [...saved.rows] });
    expect([...saved.rows].sort((a, b) => a.sku.localeCompare(b.sku))).toEqual(
      [...standingsFigures(standings).rows].sort((a, b) => a.sku.localeCompare(b.sku)),
    );
    expect(w.evidenceChange).toEqual({
      changed: true,
      lateReviews: 2,
      itemCountNow: standings.week.itemCount + 1,
      reviewCountNow: standings.week.reviewCount + 2,
    });
    expect(w.canRecompute).toBe(true);
    // The preview side scores today's evidence, which includes the late reviews.
    expect(w.items).toHaveLength(standings.week.itemCount + 1);
  });
});
