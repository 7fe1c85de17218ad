import { createHash } from 'node:crypto';
import { Readable } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { reviewCsvLines } from '../../../server/demo/scenario-csv';
import { demoCategories, demoStory, generateDemoScenario } from '../../../server/demo/scenario';
import type { DemoScenario } from '../../../server/demo/scenario';
import { collectImport } from '../../../server/modules/imports/import-parser';
import type { ReviewRow } from '../../../shared/schemas/import.schema';

const asOf = new Date('2026-11-30T00:00:00Z');
const day = 86_400_000;
const scenario = generateDemoScenario({ asOf });

function hash(rows: ReviewRow[]): string {
  return createHash('sha256').update(JSON.stringify(rows)).digest('hex');
}

/** Raw mean and the Bayesian average (m = mean count per item, C = review-weighted mean), DESIGN.md §4.2. */
function standings(s: DemoScenario, category: string, cutoff = asOf.getTime()) {
  const byItem = new Map<string, { n: number; sum: number }>();
  for (const r of s.reviews) {
    if (r.category !== category || r.reviewedAt.getTime() > cutoff) continue;
    const e = byItem.get(r.sku) ?? { n: 0, sum: 0 };
    e.n++;
    e.sum += r.stars;
    byItem.set(r.sku, e);
  }
  const entries = [...byItem.entries()];
  const total = entries.reduce((a, [, e]) => a + e.n, 0);
  const C = entries.reduce((a, [, e]) => a + e.sum, 0) / total;
  const m = total / entries.length;
  const rows = entries.map(([sku, e]) => ({
    sku,
    n: e.n,
    mean: e.sum / e.n,
    smoothed: (m * C + e.sum) / (m + e.n),
  }));
  const naive = [...rows].sort((a, b) => b.mean - a.mean || b.n - a.n);
  const smooth = [...rows].sort((a, b) => b.smoothed - a.smoothed);
  const rank = (list: typeof rows, sku: string) => list.findIndex((r) => r.sku === sku) + 1;
  return {
    rows,
    naiveRank: (sku: string) => rank(naive, sku),
    smoothRank: (sku: string) => rank(smooth, sku),
    naive,
  };
}

describe('demo scenario', () => {
  it('is deterministic for a seed and changes with the seed', () => {
    expect(hash(generateDemoScenario({ asOf }).reviews)).toBe(hash(scenario.reviews));
    expect(hash(generateDemoScenario({ asOf, seed: 7 }).reviews)).not.toBe(hash(scenario.reviews));
  });

  it('has 5 categories of 40-200 items, 30,000-60,000 reviews and at least 64 weeks of history', () => {
    expect(scenario.categories).toHaveLength(5);
    for (const c of demoCategories) {
      const count = scenario.items.filter((i) => i.category === c.slug).length;
      expect(count).toBeGreaterThanOrEqual(40);
      expect(count).toBeLessThanOrEqual(200);
      expect(c.settings.clusterPhrases.length).toBeGreaterThan(0);
    }
    expect(scenario.reviews.length).toBeGreaterThanOrEqual(30_000);
    expect(scenario.reviews.length).toBeLessThanOrEqual(60_000);
    const times = scenario.reviews.map((r) => r.reviewedAt.getTime());
    expect(Math.max(...times)).toBeLessThanOrEqual(asOf.getTime());
    expect(asOf.getTime() - Math.min(...times)).toBeGreaterThanOrEqual(64 * 7 * day);
    expect(new Set(scenario.reviews.map((r) => r.reviewId)).size).toBe(scenario.reviews.length);
    expect(new Set(scenario.items.map((i) => `${i.category}/${i.sku}`)).size).toBe(scenario.items.length);
  });

  it('has a realistic spread: a long tail, helpful votes, reviewer scores, verified flags and texts', () => {
    const counts = new Map<string, number>();
    for (const r of scenario.reviews) counts.set(r.sku, (counts.get(r.sku) ?? 0) + 1);
    const values = [...counts.values()];
    expect(values.filter((n) => n <= 5).length).toBeGreaterThan(40);
    expect(values.filter((n) => n >= 200).length).toBeGreaterThan(20);
    const share = (f: (r: ReviewRow) => boolean) =>
      scenario.reviews.filter(f).length / scenario.reviews.length;
    expect(share((r) => r.helpfulYes > 0)).toBeGreaterThan(0.2);
    expect(share((r) => r.reviewerScore !== null)).toBeGreaterThan(0.2);
    expect(share((r) => r.verified === true)).toBeGreaterThan(0.5);
    expect(share((r) => r.verified === false)).toBeGreaterThan(0.05);
    expect(share((r) => r.text !== null)).toBeGreaterThan(0.5);
    for (const r of scenario.reviews.slice(0, 500)) expect(r.reviewerId ?? 'rv-000001').toMatch(/^rv-\d{6}$/);
  });

  it('thin leader: the highest raw mean of its category on at most 5 reviews, pulled down by smoothing', () => {
    const { sku, category } = demoStory.thinLeader;
    const s = standings(scenario, category);
    const leader = s.rows.find((r) => r.sku === sku)!;
    expect(leader.n).toBeLessThanOrEqual(5);
    expect(s.naive[0]?.sku).toBe(sku);
    expect(s.naive[1]!.mean).toBeLessThan(leader.mean);
    expect(s.smoothRank(sku)).toBeGreaterThan(10);
  });

  it('buried strong item: many reviews, mean about 4.6, outranked by thin 5.0 items, first when smoothed', () => {
    const { sku, category, relatedSkus } = demoStory.buriedStrong;
    const s = standings(scenario, category);
    const strong = s.rows.find((r) => r.sku === sku)!;
    expect(strong.n).toBeGreaterThanOrEqual(300);
    expect(strong.mean).toBeGreaterThan(4.5);
    expect(strong.mean).toBeLessThan(4.7);
    for (const thin of relatedSkus) {
      const row = s.rows.find((r) => r.sku === thin)!;
      expect(row.mean).toBe(5);
      expect(s.naiveRank(thin)).toBeLessThan(s.naiveRank(sku));
    }
    expect(s.naiveRank(sku)).toBeGreaterThan(3);
    expect(s.smoothRank(sku)).toBe(1);
  });

  it('stale item: its newest review is more than 400 days before asOf', () => {
    const { sku } = demoStory.staleItem;
    const newest = Math.max(
      ...scenario.reviews.filter((r) => r.sku === sku).map((r) => r.reviewedAt.getTime()),
    );
    expect((asOf.getTime() - newest) / day).toBeGreaterThan(400);
  });

  it('negative burst: at least 5 one-star reviews in the last 30 days with the phrase, on a good baseline', () => {
    const { sku, category, phrase } = demoStory.negativeBurst;
    const reviews = scenario.reviews.filter((r) => r.sku === sku);
    const recent = reviews.filter((r) => asOf.getTime() - r.reviewedAt.getTime() <= 30 * day);
    const burst = recent.filter((r) => r.stars === 1 && r.text?.toLowerCase().includes(phrase!));
    expect(burst.length).toBeGreaterThanOrEqual(5);
    const baseline = reviews.filter((r) => asOf.getTime() - r.reviewedAt.getTime() > 30 * day);
    expect(baseline.reduce((a, r) => a + r.stars, 0) / baseline.length).toBeGreaterThan(4.2);
    expect(baseline.filter((r) => r.stars === 1).length / baseline.length).toBeLessThan(0.05);
    expect(demoCategories.find((c) => c.slug === category)?.settings.clusterPhrases).toContain(phrase);
  });

  it('steady riser: over the last 20 weeks its smoothed rank never drops and climbs into the top 10', () => {
    const { sku, category } = demoStory.steadyRiser;
    const ranks = Array.from({ length: 21 }, (_, i) =>
      standings(scenario, category, asOf.getTime() - (20 - i) * 7 * day).smoothRank(sku),
    );
    for (let i = 1; i < ranks.length; i++) expect(ranks[i]).toBeLessThanOrEqual(ranks[i - 1]!);
    expect(ranks[0]! - ranks[20]!).toBeGreaterThan(40);
    expect(ranks[20]).toBeLessThanOrEqual(10);
  });

  it('uses invented names only in the places the story names', () => {
    for (const story of Object.values(demoStory)) {
      const item = scenario.items.find((i) => i.sku === story.sku && i.category === story.category);
      expect(item?.title).toBe(story.title);
      expect(item?.role).toBe(story.key);
    }
  });

  it('loads through the review importer unchanged', async () => {
    const lines = reviewCsvLines(scenario.reviews);
    const result = await collectImport(Readable.from(lines), 'reviews', { now: asOf });
    expect(result.errors).toEqual([]);
    expect(result.rows.map((r) => r.row)).toEqual(scenario.reviews);
  }, 60_000);
});
