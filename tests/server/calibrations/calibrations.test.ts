import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calibrate, type ItemSummary, type ScoringSettings } from '../../../shared/scoring';
import type { CalibrationResponse } from '../../../shared/schemas/calibration.schema';
import type { WhatIfEvidence } from '../../../shared/schemas/standings.schema';
import { closeWorkers } from '../../../server/workers/pool';
import { loadDemoForTests } from '../../helpers/demo-data';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let analyst: Agent;
let manager: Agent;

beforeAll(async () => {
  t = await setupTestApp();
  await loadDemoForTests({ weeks: 2 });
  analyst = await t.signIn('analyst');
  manager = await t.signIn('manager');
}, 240_000);
afterAll(async () => {
  await closeWorkers();
  await t.close();
});

const packs = 'trail-packs';
const lamps = 'desk-lighting';

describe('POST /api/calibrations', () => {
  it("gives the shared engine's calibration of the week, computed in a worker", async () => {
    const evidence = (await analyst.get(`/api/categories/${packs}/what-if`).expect(200))
      .body as WhatIfEvidence;
    const items = evidence.items as unknown as ItemSummary[];
    const skus = items.map((i) => i.sku).reverse();
    const observed = [...skus, skus[0]!, 'NO-SUCH-SKU'];
    const res = await analyst
      .post('/api/calibrations')
      .set('x-csrf-token', analyst.csrf)
      .send({ category: packs, observed })
      .expect(200);
    const body = res.body as CalibrationResponse;
    const expected = calibrate(
      items,
      [...skus, 'NO-SUCH-SKU'],
      evidence.settings as Partial<ScoringSettings>,
      {
        asOf: evidence.asOf,
        unexplainedCount: 50,
      },
    );
    expect(body).toMatchObject({
      category: packs,
      isoWeek: evidence.isoWeek,
      observedCount: observed.length,
      duplicateCount: 1,
    });
    expect({
      ...body,
      category: undefined,
      isoWeek: undefined,
      observedCount: undefined,
      duplicateCount: undefined,
    }).toEqual(
      JSON.parse(
        JSON.stringify({
          ...expected,
          category: undefined,
          isoWeek: undefined,
          observedCount: undefined,
          duplicateCount: undefined,
        }),
      ),
    );
    expect(body.unmatched).toEqual(['NO-SUCH-SKU']);
  });

  it('keeps a manager to their own categories, and refuses an ordering of one sku', async () => {
    await manager
      .post('/api/calibrations')
      .set('x-csrf-token', manager.csrf)
      .send({ category: lamps, observed: ['A', 'B'] })
      .expect(403);
    await analyst
      .post('/api/calibrations')
      .set('x-csrf-token', analyst.csrf)
      .send({ category: packs, observed: ['A'] })
      .expect(400);
  });
});
