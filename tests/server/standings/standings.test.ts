import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scoreCategory, type ItemSummary, type ScoringSettings } from '../../../shared/scoring';
import type {
  CategorySettings,
  DriftChart,
  Freshness,
  ItemDetail,
  PortfolioEntry,
  Standings,
  WhatIfEvidence,
} from '../../../shared/schemas/standings.schema';
import { db } from '../../../server/db/sequelize';
import { demoStory } from '../../../server/demo/scenario';
import { loadDemoForTests } from '../../helpers/demo-data';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let analyst: Agent;
let manager: Agent;
let exec: Agent;
let admin: Agent;

beforeAll(async () => {
  t = await setupTestApp();
  await clearDemoRatings();
  await loadDemoForTests({ weeks: 8 });
  analyst = await t.signIn('analyst');
  manager = await t.signIn('manager');
  exec = await t.signIn('exec');
  admin = await t.signIn('admin');
}, 240_000);
afterAll(async () => t.close());

type SnapshotRow = {
  slug: string;
  iso_week: string;
  item_count: number;
  kendall_tau_b: number | null;
  spearman_rho: number | null;
  mean_abs_drift: number;
  stale_count: number;
  thin_count: number;
  cluster_count: number;
};

async function snapshotsOf(slug: string): Promise<SnapshotRow[]> {
  return db().query<SnapshotRow>(
    `SELECT c.slug, s.iso_week, s.item_count, s.kendall_tau_b, s.spearman_rho, s.mean_abs_drift, s.stale_count,
       s.thin_count, s.cluster_count
     FROM snapshots s JOIN categories c ON c.id = s.category_id WHERE c.slug = :slug ORDER BY s.iso_week`,
    { replacements: { slug }, type: QueryTypes.SELECT },
  );
}

/**
 * The start-up seed may already have imported the demo as of today; these tests want the fixed as-of of
 * loadDemoForTests, so whatever ratings the seed wrote go first.
 */
async function clearDemoRatings(): Promise<void> {
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
}

const kettles = 'kettles-and-brewers';
const lamps = 'desk-lighting';
const packs = 'trail-packs';

describe('GET /api/portfolio', () => {
  it('gives every category its latest stored figures and eight weeks of trend', async () => {
    const res = await analyst.get('/api/portfolio').expect(200);
    const entries = res.body as PortfolioEntry[];
    expect(entries).toHaveLength(5);
    for (const entry of entries) {
      const stored = await snapshotsOf(entry.slug);
      expect(stored).toHaveLength(8);
      const last = stored.at(-1)!;
      expect(entry.latest!.isoWeek).toBe(last.iso_week);
      expect(entry.latest!.kendallTauB).toBeCloseTo(Number(last.kendall_tau_b), 12);
      expect(entry.latest!.spearmanRho).toBeCloseTo(Number(last.spearman_rho), 12);
      expect(entry.latest!.meanAbsDrift).toBeCloseTo(Number(last.mean_abs_drift), 12);
      expect(entry.latest!.staleShare).toBeCloseTo(Number(last.stale_count) / Number(last.item_count), 12);
      expect(entry.latest!.thinShare).toBeCloseTo(Number(last.thin_count) / Number(last.item_count), 12);
      expect(entry.latest!.clusterCount).toBe(Number(last.cluster_count));
      expect(entry.trend.map((w) => w.isoWeek)).toEqual(stored.map((s) => s.iso_week));
    }
  });

  it('shows a category manager only the categories they own', async () => {
    const res = await manager.get('/api/portfolio').expect(200);
    expect((res.body as PortfolioEntry[]).map((e) => e.slug).sort()).toEqual([kettles, 'portable-power']);
  });

  it('shows every category as of a past week when asked (the link of a past portfolio digest)', async () => {
    const stored = await snapshotsOf(packs);
    const past = stored.at(-3)!.iso_week;
    const res = await exec.get(`/api/portfolio?week=${past}`).expect(200);
    for (const entry of res.body as PortfolioEntry[]) {
      expect(entry.latest!.isoWeek).toBe(past);
      expect(entry.trend.at(-1)!.isoWeek).toBe(past);
      expect(entry.trend.every((w) => w.isoWeek <= past)).toBe(true);
    }
    const packsEntry = (res.body as PortfolioEntry[]).find((e) => e.slug === packs)!;
    expect(packsEntry.latest!.kendallTauB).toBeCloseTo(Number(stored.at(-3)!.kendall_tau_b), 12);
    const refused = await exec.get('/api/portfolio?week=last-week').expect(400);
    expect(JSON.stringify(refused.body.error)).toContain('ISO week');
  });
});

describe('GET /api/categories/:slug/standings', () => {
  it('lists the latest week by smoothed rank with the total count and a page of the asked size', async () => {
    const stored = (await snapshotsOf(packs)).at(-1)!;
    const res = await analyst.get(`/api/categories/${packs}/standings?pageSize=20`).expect(200);
    const body = res.body as Standings;
    expect(body.week.isoWeek).toBe(stored.iso_week);
    expect(body.total).toBe(Number(stored.item_count));
    expect(body.rows).toHaveLength(20);
    const ranks = body.rows.map((r) => r.smoothedRank);
    expect(ranks).toEqual([...ranks].sort((a, b) => a - b));
    expect(body.rows[0]!.sku).toBe(demoStory.buriedStrong.sku);
  });

  it('sorts by drift descending and pages through without overlap', async () => {
    const first = (
      await analyst.get(`/api/categories/${packs}/standings?sort=drift&dir=desc&pageSize=25`).expect(200)
    ).body as Standings;
    const second = (
      await analyst
        .get(`/api/categories/${packs}/standings?sort=drift&dir=desc&pageSize=25&page=2`)
        .expect(200)
    ).body as Standings;
    const drifts = [...first.rows, ...second.rows].map((r) => r.drift);
    expect(drifts).toEqual([...drifts].sort((a, b) => b - a));
    const skus = new Set(first.rows.map((r) => r.sku));
    expect(second.rows.some((r) => skus.has(r.sku))).toBe(false);
    expect(second.page).toBe(2);
  });

  it('gives every row its rank range around the point rank, and sorts by how wide it is', async () => {
    const res = await analyst
      .get(`/api/categories/${packs}/standings?sort=rankRange&pageSize=200`)
      .expect(200);
    const body = res.body as Standings;
    expect(body.rankIntervals).toMatchObject({ level: 0.9, draws: 2000 });
    const widths = body.rows.map((r) => r.rankHigh! - r.rankLow!);
    expect(widths).toEqual([...widths].sort((a, b) => a - b));
    for (const r of body.rows) {
      expect(r.rankLow).toBeLessThanOrEqual(r.smoothedRank);
      expect(r.rankHigh).toBeGreaterThanOrEqual(r.smoothedRank);
      expect(r.topShare).toBeGreaterThanOrEqual(0);
    }
    // Most neighbouring ranks of a category are within the noise (Goldstein & Spiegelhalter 1996).
    expect(widths.filter((w) => w > 0).length).toBeGreaterThan(body.rows.length / 2);
  });

  it('filters by flag, by text and by drift range', async () => {
    const stale = (
      await analyst.get(`/api/categories/${lamps}/standings?flags=stale&pageSize=200`).expect(200)
    ).body as Standings;
    expect(stale.total).toBe(Number((await snapshotsOf(lamps)).at(-1)!.stale_count));
    expect(stale.rows.every((r) => r.stale === true && r.staleReason)).toBe(true);
    expect(stale.rows.map((r) => r.sku)).toContain(demoStory.staleItem.sku);

    const text = (await analyst.get(`/api/categories/${kettles}/standings?q=kb-1007`).expect(200))
      .body as Standings;
    expect(text.rows.map((r) => r.sku)).toEqual([demoStory.thinLeader.sku]);
    expect(text.rows[0]!.thin).toBe(true);

    const range = (
      await analyst.get(`/api/categories/${packs}/standings?driftMin=-2&driftMax=2&pageSize=200`).expect(200)
    ).body as Standings;
    expect(range.total).toBeGreaterThan(0);
    expect(range.rows.every((r) => r.drift >= -2 && r.drift <= 2)).toBe(true);
    const all = (await analyst.get(`/api/categories/${packs}/standings?pageSize=200`).expect(200))
      .body as Standings;
    expect(range.total).toBe(all.rows.filter((r) => r.drift >= -2 && r.drift <= 2).length);
  });

  it('refuses a sort column outside the list with 400', async () => {
    const res = await analyst
      .get(`/api/categories/${packs}/standings`)
      .query({ sort: 'smoothed_rank; DROP TABLE items; --' })
      .expect(400);
    expect(JSON.stringify(res.body.error)).toContain('sort');
    await analyst.get(`/api/categories/${packs}/standings?pageSize=500`).expect(400);
    await analyst.get(`/api/categories/${packs}/standings?flags=stale,nonsense`).expect(400);
  });

  it('treats an SQL-injection attempt in the text filter as text', async () => {
    const res = await analyst
      .get(`/api/categories/${packs}/standings`)
      .query({ q: "' OR 1=1; DROP TABLE items; --" })
      .expect(200);
    expect((res.body as Standings).total).toBe(0);
    const [{ count }] = (await db().query('SELECT COUNT(*) AS count FROM items', {
      type: QueryTypes.SELECT,
    })) as [{ count: number }];
    expect(Number(count)).toBeGreaterThan(400);
  });

  it('gives the total of the filtered view on every page, also past the last one', async () => {
    const first = (await analyst.get(`/api/categories/${packs}/standings?flags=thin&pageSize=10`).expect(200))
      .body as Standings;
    expect(first.total).toBeGreaterThan(10);
    const lastPage = Math.ceil(first.total / 10);
    const last = (
      await analyst
        .get(`/api/categories/${packs}/standings?flags=thin&pageSize=10&page=${lastPage}`)
        .expect(200)
    ).body as Standings;
    expect(last.total).toBe(first.total);
    expect(last.rows).toHaveLength(first.total - (lastPage - 1) * 10);
    const past = (
      await analyst
        .get(`/api/categories/${packs}/standings?flags=thin&pageSize=10&page=${lastPage + 5}`)
        .expect(200)
    ).body as Standings;
    expect(past).toMatchObject({ total: first.total, rows: [] });
  });

  it('answers a week that has no snapshot with 404', async () => {
    await analyst.get(`/api/categories/${packs}/standings?week=2019-W01`).expect(404);
  });
});

describe('category scope of a manager', () => {
  it('reads their own categories and gets 403 on the others', async () => {
    await manager.get(`/api/categories/${kettles}/standings`).expect(200);
    await manager.get(`/api/categories/${kettles}/items/${demoStory.thinLeader.sku}`).expect(200);
    for (const path of [
      'standings',
      'drift',
      'freshness',
      'what-if',
      'weeks',
      `items/${demoStory.staleItem.sku}`,
    ]) {
      const res = await manager.get(`/api/categories/${lamps}/${path}`).expect(403);
      expect(res.body.error.message).toBe('This category is not one of yours.');
    }
  });
});

describe('GET /api/categories/:slug/standings.csv', () => {
  it('exports the filtered view with a file name and neutralises a title that starts with =', async () => {
    await db().query(
      'UPDATE items SET title = \'=HYPERLINK("http://example.invalid","x")\' WHERE sku = :sku',
      {
        replacements: { sku: demoStory.thinLeader.sku },
      },
    );
    const res = await analyst
      .get(`/api/categories/${kettles}/standings.csv`)
      .query({ q: demoStory.thinLeader.sku, sort: 'drift' })
      .expect(200);
    expect(res.headers['content-type']).toContain('text/csv');
    expect(res.headers['content-disposition']).toMatch(
      /^attachment; filename="ballast-kettles-and-brewers-\d{4}-W\d{2}-standings-filtered\.csv"$/,
    );
    const lines = res.text
      .replace(/^\uFEFF/, '')
      .trim()
      .split('\r\n');
    expect(lines[0]).toContain('smoothed_rank,naive_rank,drift,sku,title');
    expect(lines).toHaveLength(2);
    expect(lines[1]).toContain(`"'=HYPERLINK(""http://example.invalid"",""x"")"`);
    expect(lines[1]).not.toMatch(/,"?=HYPERLINK/);
  });

  it('shows m with the strategy actually applied when it fell back, on screen data and in every CSV row', async () => {
    // A stored fallback: the category asked for credibility, the engine used the total review count.
    await db().query(
      `UPDATE snapshots s JOIN categories c ON c.id = s.category_id
       SET s.params = JSON_SET(s.params, '$.priorWeightStrategy', 'credibility', '$.priorWeightApplied', 'total')
       WHERE c.slug = :slug`,
      { replacements: { slug: lamps } },
    );
    const standings = (await analyst.get(`/api/categories/${lamps}/standings`).expect(200)).body as Standings;
    expect(standings).toMatchObject({ priorWeightStrategy: 'credibility', priorWeightApplied: 'total' });
    const sku = standings.rows[0]!.sku;
    const item = (await analyst.get(`/api/categories/${lamps}/items/${sku}`).expect(200)).body as ItemDetail;
    expect(item.current).toMatchObject({ priorWeightStrategy: 'credibility', priorWeightApplied: 'total' });

    const csv = (await analyst.get(`/api/categories/${lamps}/standings.csv`).expect(200)).text
      .replace(/^\uFEFF/, '')
      .trim()
      .split('\r\n');
    expect(csv[0]).toContain(',prior_weight_m,prior_weight_strategy_applied,');
    expect(csv[0]).toMatch(
      /,rank_range_90,rank_median,rank_range_from,rank_range_to,top10_chance,above_ahead_chance$/,
    );
    expect(csv[1]).toContain(
      `${standings.m.toFixed(4)},"total review count, a fallback: credibility could not be estimated"`,
    );
  });

  it('exports every row of an unfiltered view', async () => {
    const res = await analyst.get(`/api/categories/${packs}/standings.csv`).expect(200);
    const stored = (await snapshotsOf(packs)).at(-1)!;
    expect(res.text.trim().split('\r\n')).toHaveLength(Number(stored.item_count) + 1);
  });
});

describe('GET /api/categories/:slug/items/:sku', () => {
  it('has one timeline entry per snapshotted week, oldest first, and the flags with their reasons', async () => {
    const res = await analyst.get(`/api/categories/${kettles}/items/${demoStory.thinLeader.sku}`).expect(200);
    const item = res.body as ItemDetail;
    const stored = await snapshotsOf(kettles);
    // Its three reviews are 10, 25 and 40 days old at the end: the earliest weeks have no row for it, so its
    // timeline starts at its first snapshotted week rather than at the category's first.
    const present = item.timeline.filter((w) => w.smoothedRank !== null);
    expect(present.length).toBeGreaterThan(0);
    expect(item.timeline[0]!.smoothedRank).not.toBeNull();
    expect(item.timeline.length).toBeLessThan(stored.length);
    expect(item.timeline.map((w) => w.isoWeek)).toEqual(
      stored.map((s) => s.iso_week).slice(stored.length - item.timeline.length),
    );
    expect(item.timeline.at(-1)!.n).toBe(3);

    const strong = (
      await analyst.get(`/api/categories/${packs}/items/${demoStory.buriedStrong.sku}`).expect(200)
    ).body as ItemDetail;
    expect(strong.timeline).toHaveLength((await snapshotsOf(packs)).length);
    expect(strong.timeline.every((w) => w.naiveRank !== null && w.smoothedRank === 1)).toBe(true);
    // Rank 1 every week: a move of zero places is said as such, not as "Moved up 0 places".
    const mover = strong.current!.flags.find((f) => f.flag === 'mover')!;
    expect(mover.reason).toMatch(/^Held its place smoothed and /);
    expect(mover.reason).not.toMatch(/ 0 places/);
    const thin = item.current!.flags.find((f) => f.flag === 'thin')!;
    expect(thin.on).toBe(true);
    expect(thin.reason).toMatch(/^3 reviews, below the thin-evidence threshold/);
    expect(item.current!.histogram).toEqual([0, 0, 0, 0, 3]);
    expect(item.current!.naiveRank).toBe(1);
  });

  it('shows the most helpful reviews without reviewer identifiers, and what it takes to pass', async () => {
    const res = await analyst.get(`/api/categories/${packs}/items/TP-2077`).expect(200);
    const item = res.body as ItemDetail;
    expect(res.text).not.toMatch(/reviewer/i);
    for (const review of item.helpfulReviews)
      expect(Object.keys(review).sort()).toEqual([
        'body',
        'helpfulNo',
        'helpfulYes',
        'reviewedAt',
        'stars',
        'verified',
      ]);
    const c = item.current!;
    expect(c.above).not.toBeNull();
    expect(c.reviewsToPass).toBeGreaterThan(0);
    const k = c.reviewsToPass!;
    const after = (m: number) => (c.m * c.C + c.sumStars + 5 * m) / (c.m + c.n + m);
    expect(after(k)).toBeGreaterThan(c.above!.smoothed);
    expect(after(k - 1)).toBeLessThanOrEqual(c.above!.smoothed);
  });

  it('answers an unknown sku with 404', async () => {
    await analyst.get(`/api/categories/${packs}/items/NO-SUCH-SKU`).expect(404);
  });
});

describe('GET /api/categories/:slug/drift and /freshness', () => {
  it('gives every item of the week to the drift chart and buckets every item by review age', async () => {
    const stored = (await snapshotsOf(lamps)).at(-1)!;
    const drift = (await analyst.get(`/api/categories/${lamps}/drift`).expect(200)).body as DriftChart;
    expect(drift.skus).toHaveLength(Number(stored.item_count));
    expect(drift.naive).toHaveLength(drift.skus.length);
    const fresh = (await analyst.get(`/api/categories/${lamps}/freshness`).expect(200)).body as Freshness;
    expect(fresh.buckets.reduce((s, b) => s + b.count, 0) + fresh.unknownAge).toBe(Number(stored.item_count));
    expect(fresh.staleTotal).toBe(Number(stored.stale_count));
    expect(fresh.stale[0]!.newestAgeDays).toBeGreaterThanOrEqual(fresh.staleAfterDays);
  });
});

describe('GET /api/categories/:slug/what-if', () => {
  it('gives evidence that the shared engine re-scores to the stored smoothed scores and ranks', async () => {
    for (const slug of [kettles, packs]) {
      const evidence = (await analyst.get(`/api/categories/${slug}/what-if`).expect(200))
        .body as WhatIfEvidence;
      const result = scoreCategory(
        evidence.items as unknown as ItemSummary[],
        evidence.settings as unknown as ScoringSettings,
        { asOf: evidence.asOf, previous: evidence.previous },
      );
      expect(result.resolved.m).toBeCloseTo(Number(evidence.resolved.m), 9);
      const stored = (await analyst.get(`/api/categories/${slug}/standings?pageSize=200`).expect(200))
        .body as Standings;
      expect(result.items).toHaveLength(stored.total);
      const bySku = new Map(result.items.map((r) => [r.sku, r]));
      for (const row of stored.rows) {
        const again = bySku.get(row.sku)!;
        expect(Math.abs(again.smoothed - row.smoothed), row.sku).toBeLessThan(1e-9);
        expect(Math.abs(again.lowerBound - row.lowerBound), row.sku).toBeLessThan(1e-9);
        expect(again.smoothedRank, row.sku).toBe(row.smoothedRank);
        expect(again.naiveRank, row.sku).toBe(row.naiveRank);
        expect(again.smoothedMovement, row.sku).toBe(row.smoothedMovement);
      }
    }
  });

  it('recomputes the decay sums for another half-life', async () => {
    const base = (await analyst.get(`/api/categories/${packs}/what-if`).expect(200)).body as WhatIfEvidence;
    const short = (await analyst.get(`/api/categories/${packs}/what-if?halfLifeDays=30`).expect(200))
      .body as WhatIfEvidence;
    expect(short.settings.halfLifeDays).toBe(30);
    const a = base.items[0] as unknown as ItemSummary;
    const b = short.items.find((i) => i.sku === a.sku) as unknown as ItemSummary;
    expect(b.decayWeightSum).toBeLessThan(a.decayWeightSum!);
  });
});

describe('PUT /api/categories/:slug/settings', () => {
  const slug = 'portable-power';

  it('lets the manager of the category save, and records the change with before and after', async () => {
    const before = (await manager.get(`/api/categories/${slug}/settings`).expect(200))
      .body as CategorySettings;
    expect(before.canEdit).toBe(true);
    const res = await manager
      .put(`/api/categories/${slug}/settings`)
      .set('x-csrf-token', manager.csrf)
      .send({ priorWeightStrategy: 'fixed', priorWeightValue: 40, z: 1.28 })
      .expect(200);
    const saved = res.body as CategorySettings;
    expect(saved.effective).toMatchObject({ priorWeightStrategy: 'fixed', priorWeightValue: 40, z: 1.28 });
    expect(saved.stored.clusterPhrases).toEqual(before.stored.clusterPhrases);
    const [event] = await db().query<{ details: string | Record<string, unknown>; actor_email: string }>(
      `SELECT details, actor_email FROM audit_events WHERE action = 'category.settings_updated' AND target_id = :slug
       ORDER BY id DESC LIMIT 1`,
      { replacements: { slug }, type: QueryTypes.SELECT },
    );
    const details = (typeof event!.details === 'string' ? JSON.parse(event!.details) : event!.details) as {
      before: Record<string, unknown>;
      after: Record<string, unknown>;
    };
    expect(event!.actor_email).toBe('mira.manager@demo.ballast.test');
    expect(details.before.priorWeightStrategy).toBeUndefined();
    expect(details.after).toMatchObject({ priorWeightStrategy: 'fixed', priorWeightValue: 40, z: 1.28 });
  });

  it('refuses the exec and the analyst with 403 and says they cannot edit', async () => {
    for (const agent of [exec, analyst]) {
      const view = (await agent.get(`/api/categories/${slug}/settings`).expect(200)).body as CategorySettings;
      expect(view.canEdit).toBe(false);
      await agent
        .put(`/api/categories/${slug}/settings`)
        .set('x-csrf-token', agent.csrf)
        .send({ z: 2 })
        .expect(403);
    }
    await manager
      .put(`/api/categories/${lamps}/settings`)
      .set('x-csrf-token', manager.csrf)
      .send({ z: 2 })
      .expect(403);
  });

  it('names a bad setting in the words of the form, not by its field path', async () => {
    const res = await admin
      .put(`/api/categories/${slug}/settings`)
      .set('x-csrf-token', admin.csrf)
      .send({ priorWeightValue: -3 })
      .expect(400);
    expect(res.body.error.message).toMatch(/^Prior weight m: /);
    expect(res.body.error.message).not.toMatch(/priorWeightValue|settings\./);
    // The engine's own check (fixed needs a value) speaks the same words.
    const fixed = await admin
      .put(`/api/categories/${slug}/settings`)
      .set('x-csrf-token', admin.csrf)
      .send({ priorWeightStrategy: 'fixed', priorWeightValue: null })
      .expect(400);
    expect(fixed.body.error.message).not.toMatch(/priorWeightValue|settings\./);
    expect(fixed.body.error.message).toMatch(/^Prior weight m: /);
  });

  it('refuses settings the engine cannot use, and unknown fields', async () => {
    await admin
      .put(`/api/categories/${slug}/settings`)
      .set('x-csrf-token', admin.csrf)
      .send({ priorWeightStrategy: 'fixed', priorWeightValue: null })
      .expect(400);
    await admin
      .put(`/api/categories/${slug}/settings`)
      .set('x-csrf-token', admin.csrf)
      .send({ dropTables: true })
      .expect(400);
  });
});

describe('calibration notes', () => {
  const note = {
    isoWeek: '',
    note: 'Storefront listing of 1 Dec',
    observedCount: 3,
    matchedCount: 3,
    unmatched: [],
    C: 4.1,
    best: { start: 10, end: 20, point: 14.1, tau: 0.9 },
    strategies: [{ strategy: 'mean', m: 12, tau: 0.9 }],
    unexplained: [{ sku: 'TP-2031', observedPosition: 3, fittedPosition: 1, gap: 2 }],
  };

  it('saves a note for an analyst and lists it, and refuses the exec', async () => {
    const week = (await snapshotsOf(packs)).at(-1)!.iso_week;
    const res = await analyst
      .post(`/api/categories/${packs}/calibration-notes`)
      .set('x-csrf-token', analyst.csrf)
      .send({ ...note, isoWeek: week })
      .expect(201);
    expect(res.body).toMatchObject({ note: note.note, createdBy: 'Anil Corrowan', best: note.best });
    const list = await exec.get(`/api/categories/${packs}/calibration-notes`).expect(200);
    expect((list.body as { id: number }[]).map((n) => n.id)).toEqual([res.body.id]);
    await exec
      .post(`/api/categories/${packs}/calibration-notes`)
      .set('x-csrf-token', exec.csrf)
      .send({ ...note, isoWeek: week })
      .expect(403);
  });

  it('refuses a note whose figures the evidence cannot give, naming the field and the reason', async () => {
    const week = (await snapshotsOf(packs)).at(-1)!.iso_week;
    const bad: [string, Record<string, unknown>][] = [
      ['observedCount', { observedCount: 0, matchedCount: 3 }],
      ['matchedCount', { observedCount: 100000, matchedCount: 100000 }],
      ['C', { C: -1e300 }],
      ['strategies', { strategies: [{ strategy: 'mean', m: 12, tau: 99 }] }],
      [
        'unexplained',
        { unexplained: [{ sku: 'NO-SUCH-SKU', observedPosition: 3, fittedPosition: 1, gap: 2 }] },
      ],
      ['unexplained', { unexplained: [{ sku: 'TP-2031', observedPosition: 3, fittedPosition: 1, gap: 5 }] }],
    ];
    for (const [field, change] of bad) {
      const res = await analyst
        .post(`/api/categories/${packs}/calibration-notes`)
        .set('x-csrf-token', analyst.csrf)
        .send({ ...note, ...change, isoWeek: week })
        .expect(400);
      const body = res.body as { error: { message: string; details: { path: string; message: string }[] } };
      expect(body.error.details[0]!.path, JSON.stringify(change)).toBe(field);
      expect(body.error.message).not.toMatch(/\.\w+Count|settings\./);
    }
    const list = await analyst.get(`/api/categories/${packs}/calibration-notes`).expect(200);
    expect((list.body as { C: number }[]).every((n) => n.C === note.C)).toBe(true);
  });
});
