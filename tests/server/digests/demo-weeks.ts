import { lastCompletedIsoWeek, shiftIsoWeek } from '../../../shared/iso-week';
import { Category, Item } from '../../../server/db/models';
import { backfillSnapshots } from '../../../server/modules/snapshots/snapshots.service';
import { loadDemoForTests, testDemoAsOf } from '../../helpers/demo-data';

/**
 * The demo scenario with its last `weeks` weekly snapshots. Works whether or not the seed has already
 * imported the demo reviews (newer seeds do).
 */
export async function demoWithSnapshots(weeks: number): Promise<void> {
  if ((await Item.count()) === 0) {
    await loadDemoForTests({ weeks });
    return;
  }
  const toWeek = lastCompletedIsoWeek(testDemoAsOf);
  const fromWeek = shiftIsoWeek(toWeek, -(weeks - 1));
  for (const c of await Category.findAll({ attributes: ['id'] })) {
    await backfillSnapshots({ categoryId: c.id, fromWeek, toWeek, now: testDemoAsOf });
  }
}
