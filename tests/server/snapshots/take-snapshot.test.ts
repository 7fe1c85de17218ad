import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { resolveSettings, summariseReviews, type ReviewInput } from '../../../shared/scoring';
import { Category, Item, Review, Snapshot, SnapshotRow } from '../../../server/db/models';
import { loadCategoryEvidence } from '../../../server/modules/snapshots/snapshot-evidence';
import { backfillSnapshots, takeSnapshot } from '../../../server/modules/snapshots/snapshots.service';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await setupTestApp();
});
afterAll(async () => t.close());

type SeedReview = Omit<ReviewInput, 'reviewedAt'> & { reviewedAt: string };

async function seedCategory(
  slug: string,
  items: Record<string, SeedReview[]>,
  settings = {},
): Promise<number> {
  const category = await Category.create({ slug, name: `Test ${slug}`, settings });
  let n = 0;
  for (const [sku, reviews] of Object.entries(items)) {
    const item = await Item.create({
      categoryId: category.id,
      sku,
      title: `Item ${sku}`,
      brand: null,
      url: null,
    });
    await Review.bulkCreate(
      reviews.map((r) => ({
        itemId: item.id,
        externalId: `r${(n += 1)}`,
        stars: r.stars,
        reviewedAt: new Date(r.reviewedAt),
        helpfulYes: r.helpfulYes ?? 0,
        helpfulNo: r.helpfulNo ?? 0,
        reviewerExternalId: null,
        reviewerScore: r.reviewerScore ?? null,
        verified: null,
        body: r.text ?? null,
        importBatchId: null,
      })),
    );
  }
  return category.id;
}

const day = (iso: string): string => `${iso}T12:00:00Z`;

describe('takeSnapshot on a small hand-checked category', () => {
  let categoryId: number;
  beforeAll(async () => {
    categoryId = await seedCategory('hand-checked', {
      A: [{ stars: 5, reviewedAt: day('2026-11-02') }],
      B: [5, 5, 5, 4, 4].map((stars) => ({ stars, reviewedAt: day('2026-11-03') })),
      C: [4, 4, 4, 3].map((stars) => ({ stars, reviewedAt: day('2026-11-04') })),
      // Dated after the W45 cut-off: must not count in that week.
      D: [{ stars: 1, reviewedAt: day('2026-11-10') }],
    });
  });

  it('computes the numbers worked out by hand', async () => {
    const outcome = await takeSnapshot({
      categoryId,
      isoWeek: '2026-W45',
      now: new Date('2026-12-01T00:00:00Z'),
    });
    expect(outcome).toMatchObject({ isoWeek: '2026-W45', rows: 3, replaced: false });
    const snapshot = (await Snapshot.findByPk(outcome.snapshotId))!;
    // Cut-off of ISO week 2026-W45 (Mon 2 Nov – Sun 8 Nov): Monday 9 Nov 00:00 UTC.
    expect(snapshot.cutoff.toISOString()).toBe('2026-11-09T00:00:00.000Z');
    // n = 1, 5, 4 (10 reviews, 43 stars): C = 43/10 = 4.3; m = mean count = 10/3.
    expect(snapshot.params.C).toBeCloseTo(4.3, 12);
    expect(snapshot.params.m).toBeCloseTo(10 / 3, 12);
    const rows = await SnapshotRow.findAll({ where: { snapshotId: outcome.snapshotId } });
    const bySku = Object.fromEntries(rows.map((r) => [r.details.sku, r]));
    // s = (m*C + sum)/(m + n): A (14.333+5)/4.333 = 4.4615; B (14.333+23)/8.333 = 4.48; C (14.333+15)/7.333 = 4.0.
    expect(bySku.A!.smoothed).toBeCloseTo(58 / 13, 10);
    expect(bySku.B!.smoothed).toBeCloseTo(4.48, 10);
    expect(bySku.C!.smoothed).toBeCloseTo(4.0, 10);
    // Naive A 1, B 2, C 3; smoothed B 1, A 2, C 3; drift = naive − smoothed.
    expect([bySku.A!.naiveRank, bySku.B!.naiveRank, bySku.C!.naiveRank]).toEqual([1, 2, 3]);
    expect([bySku.A!.smoothedRank, bySku.B!.smoothedRank, bySku.C!.smoothedRank]).toEqual([2, 1, 3]);
    expect([bySku.A!.drift, bySku.B!.drift, bySku.C!.drift]).toEqual([-1, 1, 0]);
    // Ranks (1,2,3) against (2,1,3): Σd² = 2, rho = 1 − 6·2/(3·8) = 0.5; one discordant pair of three: tau = 1/3.
    expect(snapshot.spearmanRho).toBeCloseTo(0.5, 12);
    expect(snapshot.kendallTauB).toBeCloseTo(1 / 3, 12);
    expect(snapshot.meanAbsDrift).toBeCloseTo(2 / 3, 12);
    // Thin evidence below a quarter of the mean count, 10/3/4 ≈ 0.83: one review is not below it.
    expect(bySku.A!.thin).toBe(false);
  });
});

describe('one snapshot per category and week', () => {
  let categoryId: number;
  beforeAll(async () => {
    categoryId = await seedCategory('unique-week', {
      A: [4, 5, 3].map((stars) => ({ stars, reviewedAt: day('2026-10-05') })),
      B: [2, 5].map((stars) => ({ stars, reviewedAt: day('2026-10-06') })),
    });
  });

  it('refuses a second snapshot of the same week, replaces it when asked, and keeps one row', async () => {
    const now = new Date('2026-12-01T00:00:00Z');
    await takeSnapshot({ categoryId, isoWeek: '2026-W41', now });
    await expect(takeSnapshot({ categoryId, isoWeek: '2026-W41', now })).rejects.toMatchObject({
      status: 409,
    });
    const again = await takeSnapshot({ categoryId, isoWeek: '2026-W41', now, replace: true });
    expect(again.replaced).toBe(true);
    expect(await Snapshot.count({ where: { categoryId, isoWeek: '2026-W41' } })).toBe(1);
    expect(await SnapshotRow.count({ where: { snapshotId: again.snapshotId } })).toBe(2);
  });

  it('lets only one of two simultaneous runs write the week', async () => {
    const now = new Date('2026-12-01T00:00:00Z');
    const results = await Promise.allSettled([
      takeSnapshot({ categoryId, isoWeek: '2026-W42', now }),
      takeSnapshot({ categoryId, isoWeek: '2026-W42', now }),
    ]);
    expect(results.filter((r) => r.status === 'fulfilled')).toHaveLength(1);
    expect(results.filter((r) => r.status === 'rejected')).toHaveLength(1);
    expect(await Snapshot.count({ where: { categoryId, isoWeek: '2026-W42' } })).toBe(1);
  });

  it('measures week-over-week movement against the previous snapshot', async () => {
    const item = (await Item.findOne({ where: { categoryId, sku: 'B' } }))!;
    // B gains eight five-star reviews in W43 and overtakes A in both orderings.
    await Review.bulkCreate(
      Array.from({ length: 8 }, (_, k) => ({
        itemId: item.id,
        externalId: `late-${k}`,
        stars: 5,
        reviewedAt: new Date('2026-10-20T09:00:00Z'),
        reviewerExternalId: null,
        reviewerScore: null,
        verified: null,
        body: null,
        importBatchId: null,
      })),
    );
    const w43 = await takeSnapshot({
      categoryId,
      isoWeek: '2026-W43',
      now: new Date('2026-12-01T00:00:00Z'),
    });
    const rows = await SnapshotRow.findAll({ where: { snapshotId: w43.snapshotId } });
    const b = rows.find((r) => r.details.sku === 'B')!;
    const a = rows.find((r) => r.details.sku === 'A')!;
    expect(b.naiveRank).toBe(1);
    expect(b.naiveMovement).toBe(1);
    expect(a.naiveMovement).toBe(-1);
  });

  it('refuses a week that has not started and a label that is not a week', async () => {
    const now = new Date('2026-12-01T00:00:00Z');
    await expect(takeSnapshot({ categoryId, isoWeek: '2027-W10', now })).rejects.toMatchObject({
      status: 400,
    });
    await expect(takeSnapshot({ categoryId, isoWeek: '2026-48', now })).rejects.toMatchObject({
      status: 400,
    });
  });
});

describe('backfill', () => {
  it('fills every week from the first rating to the last completed week, skipping those already taken', async () => {
    const categoryId = await seedCategory('backfill', {
      A: [
        { stars: 4, reviewedAt: day('2026-09-01') },
        { stars: 5, reviewedAt: day('2026-09-20') },
      ],
      B: [{ stars: 3, reviewedAt: day('2026-09-15') }],
    });
    const now = new Date('2026-10-14T10:00:00Z'); // a Wednesday of W42: W41 is the last completed week
    const progress: number[] = [];
    const first = await backfillSnapshots({ categoryId, now, onProgress: (done) => progress.push(done) });
    // 2026-09-01 is in W36; W36..W41 is six weeks.
    expect(first.map((o) => o.isoWeek)).toEqual([
      '2026-W36',
      '2026-W37',
      '2026-W38',
      '2026-W39',
      '2026-W40',
      '2026-W41',
    ]);
    expect(progress).toEqual([1, 2, 3, 4, 5, 6]);
    // Only A existed in W36 and W37; B appears from W38 (15 September).
    expect(first[0]!.rows).toBe(1);
    expect(first[2]!.rows).toBe(2);
    expect(await backfillSnapshots({ categoryId, now })).toEqual([]);
  });
});

describe('SQL aggregates against the engine review by review', () => {
  it('gives the same evidence summary as summariseReviews of shared/scoring', async () => {
    const phrases = ['lid cracked', 'smells odd'];
    const reviews: SeedReview[] = [
      {
        stars: 1,
        reviewedAt: '2026-11-20T08:00:00Z',
        text: 'The LID CRACKED after a week',
        helpfulYes: 3,
        helpfulNo: 1,
      },
      {
        stars: 1,
        reviewedAt: '2026-11-18T08:30:00Z',
        text: 'lid cracked, smells odd',
        helpfulYes: 0,
        helpfulNo: 2,
      },
      { stars: 5, reviewedAt: '2026-10-01T00:00:00Z', helpfulYes: 12, helpfulNo: 0, reviewerScore: 0.9 },
      { stars: 4, reviewedAt: '2026-06-15T13:45:10Z', helpfulYes: 5, helpfulNo: 5, reviewerScore: 0.25 },
      { stars: 3, reviewedAt: '2025-12-24T23:59:59Z', text: 'fine' },
      { stars: 2, reviewedAt: '2025-03-03T03:03:03Z', helpfulYes: 1, helpfulNo: 0 },
    ];
    const categoryId = await seedCategory('cross-check', { X: reviews }, { clusterPhrases: phrases });
    const cutoff = new Date('2026-11-23T00:00:00Z');
    const settings = resolveSettings({ clusterPhrases: phrases });
    const { items } = await loadCategoryEvidence(categoryId, cutoff, settings);
    const fromEngine = summariseReviews(reviews, cutoff, settings);
    const fromSql = items[0]!;
    for (const [key, value] of Object.entries(fromEngine)) {
      const got = (fromSql as unknown as Record<string, unknown>)[key];
      if (typeof value === 'number') expect(got, key).toBeCloseTo(value, 9);
      else expect(got, key).toEqual(value);
    }
    expect(fromSql.phraseCounts).toEqual({ 'lid cracked': 2, 'smells odd': 1 });
  });
});
