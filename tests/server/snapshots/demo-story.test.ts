import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../../server/db/sequelize';
import { demoStory } from '../../../server/demo/scenario';
import { loadDemoForTests } from '../../helpers/demo-data';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await setupTestApp();
  await loadDemoForTests({ weeks: 6 });
}, 120_000);
afterAll(async () => t.close());

type Row = {
  sku: string;
  iso_week: string;
  naive_rank: number;
  smoothed_rank: number;
  drift: number;
  n: number;
  stale: number;
  negative_cluster: number;
  thin: number;
};

async function rowsOf(sku: string): Promise<Row[]> {
  return db().query<Row>(
    `SELECT i.sku, s.iso_week, sr.naive_rank, sr.smoothed_rank, sr.drift, sr.n, sr.stale, sr.negative_cluster, sr.thin
     FROM snapshot_rows sr JOIN snapshots s ON s.id = sr.snapshot_id JOIN items i ON i.id = sr.item_id
     WHERE i.sku = :sku ORDER BY s.iso_week`,
    { replacements: { sku }, type: QueryTypes.SELECT },
  );
}

describe('weekly snapshots of the demo scenario show the story it was built to tell', () => {
  it('takes one snapshot per category for each of the six weeks', async () => {
    const [row] = await db().query<{ count: number }>('SELECT COUNT(*) AS count FROM snapshots', {
      type: QueryTypes.SELECT,
    });
    expect(Number(row?.count)).toBe(30);
  });

  it('shows the thin leader on top of the raw sort and pulled down by smoothing', async () => {
    const last = (await rowsOf(demoStory.thinLeader.sku)).at(-1)!;
    expect(last.naive_rank).toBe(1);
    expect(last.drift).toBeLessThan(-5);
  });

  it('lifts the buried strong item by smoothing', async () => {
    const last = (await rowsOf(demoStory.buriedStrong.sku)).at(-1)!;
    expect(last.smoothed_rank).toBe(1);
    expect(last.drift).toBeGreaterThan(5);
  });

  it('flags the stale item and the negative burst', async () => {
    expect((await rowsOf(demoStory.staleItem.sku)).at(-1)!.stale).toBe(1);
    expect((await rowsOf(demoStory.negativeBurst.sku)).at(-1)!.negative_cluster).toBe(1);
  });

  it('shows the steady riser climbing in the smoothed ordering', async () => {
    const rows = await rowsOf(demoStory.steadyRiser.sku);
    expect(rows.length).toBe(6);
    expect(rows.at(-1)!.smoothed_rank).toBeLessThan(rows[0]!.smoothed_rank);
  });
});
