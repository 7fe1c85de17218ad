import { lastCompletedIsoWeek, shiftIsoWeek } from '../../shared/iso-week';
import { Category } from '../../server/db/models';
import { db } from '../../server/db/sequelize';
import { generateDemoScenario, type DemoScenario } from '../../server/demo/scenario';
import { backfillSnapshots } from '../../server/modules/snapshots/snapshots.service';

/** The demo's fixed end for tests, so figures do not move with the calendar. */
export const testDemoAsOf = new Date('2026-11-30T00:00:00Z');

/**
 * Writes the invented demo scenario straight into the tables (the import path has its own tests) and,
 * when asked, backfills the last `weeks` weekly snapshots of every demo category. Needs `seedDemo` first.
 * The rows arrive at the demo's as-of, the moment its snapshots are taken, so a snapshot's evidence is the
 * evidence on file: no "evidence changed since this snapshot" unless a test adds a review after it.
 */
export async function loadDemoForTests(options: { weeks?: number } = {}): Promise<DemoScenario> {
  const scenario = generateDemoScenario({ asOf: testDemoAsOf });
  const categories = new Map((await Category.findAll()).map((c) => [c.slug, c.id]));
  const sequelize = db();
  const now = testDemoAsOf;
  const itemRows = scenario.items.map((item) => [
    categories.get(item.category),
    item.sku,
    item.title,
    now,
    now,
  ]);
  await sequelize.query(
    `INSERT INTO items (category_id, sku, title, created_at, updated_at) VALUES ${itemRows.map(() => '(?,?,?,?,?)').join(',')}`,
    { replacements: itemRows.flat() },
  );
  const [ids] = (await sequelize.query('SELECT id, category_id, sku FROM items')) as [
    { id: number; category_id: number; sku: string }[],
    unknown,
  ];
  const itemId = new Map(ids.map((r) => [`${r.category_id}/${r.sku}`, r.id]));
  for (let start = 0; start < scenario.reviews.length; start += 2000) {
    const chunk = scenario.reviews.slice(start, start + 2000);
    const values = chunk.flatMap((r) => [
      itemId.get(`${categories.get(r.category)}/${r.sku}`),
      r.reviewId,
      r.stars,
      r.reviewedAt,
      r.helpfulYes,
      r.helpfulNo,
      r.reviewerId,
      r.reviewerScore,
      r.verified,
      r.text,
      now,
      now,
    ]);
    await sequelize.query(
      `INSERT INTO reviews (item_id, external_id, stars, reviewed_at, helpful_yes, helpful_no, reviewer_external_id,
         reviewer_score, verified, body, created_at, updated_at) VALUES ${chunk.map(() => '(?,?,?,?,?,?,?,?,?,?,?,?)').join(',')}`,
      { replacements: values },
    );
  }
  if (options.weeks) {
    const toWeek = lastCompletedIsoWeek(testDemoAsOf);
    const fromWeek = shiftIsoWeek(toWeek, -(options.weeks - 1));
    for (const categoryId of categories.values()) {
      await backfillSnapshots({ categoryId, fromWeek, toWeek, now: testDemoAsOf });
    }
  }
  return scenario;
}
