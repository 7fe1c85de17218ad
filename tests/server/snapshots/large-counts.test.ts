import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scoreCategory } from '../../../shared/scoring';
import { AggregateObservation, Category, Item, SnapshotRow } from '../../../server/db/models';
import { takeSnapshot } from '../../../server/modules/snapshots/snapshots.service';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let analyst: Agent;
beforeAll(async () => {
  t = await setupTestApp();
  analyst = await t.signIn('analyst');
});
afterAll(async () => t.close());

describe('what it would take for items with the largest counts an import accepts', () => {
  it('stores and serves a count of reviews beyond 2^53 as the engine gives it', async () => {
    // m fixed at 1 puts the leader within a few billionths of five stars, so the item behind needs
    // about 2e16 five-star reviews to pass it: beyond both INT UNSIGNED and 2^53.
    const settings = {
      priorWeightStrategy: 'fixed' as const,
      priorWeightValue: 1,
      priorMeanStrategy: 'fixed' as const,
      priorMeanValue: 4.5,
    };
    const category = await Category.create({ slug: 'huge-counts', name: 'Huge counts', settings });
    const items = [
      { sku: 'HC-1', reviewCount: 100_000_000, meanStars: 5 },
      { sku: 'HC-2', reviewCount: 100_000_000, meanStars: 4 },
    ];
    for (const it of items) {
      const item = await Item.create({
        categoryId: category.id,
        sku: it.sku,
        title: it.sku,
        brand: null,
        url: null,
      });
      await AggregateObservation.create({
        itemId: item.id,
        observedOn: '2026-11-01',
        reviewCount: it.reviewCount,
        meanStars: it.meanStars,
        stars1: null,
        stars2: null,
        stars3: null,
        stars4: null,
        stars5: null,
        newestReviewAt: null,
        importBatchId: null,
      });
    }
    const outcome = await takeSnapshot({
      categoryId: category.id,
      isoWeek: '2026-W45',
      now: new Date('2026-12-01T00:00:00Z'),
    });
    const expected = scoreCategory(
      items.map((it) => ({ sku: it.sku, count: it.reviewCount, mean: it.meanStars })),
      settings,
      { asOf: '2026-11-09T00:00:00Z' },
    ).items.find((it) => it.sku === 'HC-2')!.reviewsToPass!;
    expect(expected).toBeGreaterThan(Number.MAX_SAFE_INTEGER);

    const rows = await SnapshotRow.findAll({ where: { snapshotId: outcome.snapshotId } });
    expect(rows.map((r) => r.reviewsToPass).sort()).toEqual([expected, null].sort());
    // Each DOUBLE attribute reads its own column: the means are 5 and 4, the ages unknown.
    expect(rows.map((r) => [r.rawMean, r.newestAgeDays, r.oneStarShare]).sort()).toEqual([
      [4, null, null],
      [5, null, null],
    ]);

    const res = await analyst.get('/api/categories/huge-counts/items/HC-2?week=2026-W45').expect(200);
    expect((res.body as { current: { reviewsToPass: number } }).current.reviewsToPass).toBe(expected);
  });
});
