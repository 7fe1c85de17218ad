import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scoreWithRankIntervals } from '../../../shared/scoring';
import { Category, Item, Review, Snapshot, SnapshotRow } from '../../../server/db/models';
import { loadCategoryEvidence } from '../../../server/modules/snapshots/snapshot-evidence';
import {
  categorySettings,
  rankSeed,
  takeSnapshot,
} from '../../../server/modules/snapshots/snapshots.service';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

// Invented data. The stored intervals must be exactly the engine's for the stored seed and S (issue 19:
// "the seed and S are stored with the snapshot so every figure can be reproduced exactly").
let t: TestApp;
let categoryId: number;
beforeAll(async () => {
  t = await setupTestApp();
  const category = await Category.create({ slug: 'rank-lamps', name: 'Rank Lamps', settings: {} });
  categoryId = category.id;
  let k = 0;
  for (let i = 0; i < 14; i++) {
    const item = await Item.create({
      categoryId,
      sku: `RL-${i}`,
      title: `Lamp ${i}`,
      brand: null,
      url: null,
    });
    const stars = Array.from({ length: 3 + i * 2 }, (_, j) => 1 + ((i + j * ((i % 4) + 1)) % 5));
    await Review.bulkCreate(
      stars.map((s, j) => ({
        itemId: item.id,
        externalId: `rl-${(k += 1)}`,
        stars: s,
        reviewedAt: new Date(Date.UTC(2026, 10, 2 + (j % 5), 12)),
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
});
afterAll(async () => t.close());

describe('rank intervals stored with the snapshot', () => {
  it('stores seed, S and level on the snapshot and intervals the engine reproduces exactly', async () => {
    const outcome = await takeSnapshot({
      categoryId,
      isoWeek: '2026-W45',
      now: new Date('2026-12-01T00:00:00Z'),
    });
    const snapshot = (await Snapshot.findByPk(outcome.snapshotId))!;
    expect(snapshot.rankSeed).toBe(rankSeed(categoryId, '2026-W45'));
    expect(snapshot.rankDraws).toBe(2000);
    expect(snapshot.rankLevel).toBe(0.9);
    expect(snapshot.rankTopK).toBe(10);

    const rows = await SnapshotRow.findAll({ where: { snapshotId: snapshot.id } });
    expect(rows).toHaveLength(14);
    const settings = categorySettings({});
    const evidence = await loadCategoryEvidence(categoryId, snapshot.cutoff, settings);
    const again = scoreWithRankIntervals(
      evidence.items,
      settings,
      { asOf: snapshot.cutoff },
      {
        seed: snapshot.rankSeed!,
        draws: snapshot.rankDraws!,
        level: snapshot.rankLevel!,
        topK: snapshot.rankTopK!,
      },
    );
    for (const row of rows) {
      const i = again.result.items.findIndex((it) => it.sku === row.details.sku);
      expect([row.rankLow, row.rankMedian, row.rankHigh]).toEqual([
        again.intervals.lowerRank[i],
        again.intervals.medianRank[i],
        again.intervals.upperRank[i],
      ]);
      expect(row.topShare).toBe(again.intervals.topShare[i]);
      const ahead = again.intervals.aboveAheadShare[i]!;
      expect(row.aboveAheadShare).toBe(Number.isNaN(ahead) ? null : ahead);
      expect(row.smoothedRank).toBeGreaterThanOrEqual(row.rankLow!);
      expect(row.smoothedRank).toBeLessThanOrEqual(row.rankHigh!);
    }
    expect(rows.filter((r) => r.aboveAheadShare === null)).toHaveLength(1);
  });
});
