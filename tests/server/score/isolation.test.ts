import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Category, Snapshot } from '../../../server/db/models';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';
import { demoWithSnapshots } from '../digests/demo-weeks';

// One worker, no waiting room and one heavy request per caller, so every limit is reached on purpose.
let t: TestApp;
let analyst: Agent;
let manager: Agent;
let admin: Agent;
beforeAll(async () => {
  t = await setupTestApp({
    BALLAST_WORKERS: '1',
    BALLAST_WORKER_QUEUE: '0',
    BALLAST_HEAVY_PER_PRINCIPAL: '1',
  });
  analyst = await t.signIn('analyst');
  manager = await t.signIn('manager');
  admin = await t.signIn('admin');
  await demoWithSnapshots(1);
});
afterAll(async () => t.close());

/** The documented maximum of POST /api/score: 200,000 items (shared/schemas/score.schema.ts). */
const maxBody = {
  items: Array.from({ length: 200_000 }, (_, i) => ({
    sku: `s${i}`,
    count: (i * 7919) % 500,
    mean: 1 + ((i * 104_729) % 400) / 100,
  })),
};
const smallBody = {
  items: [
    { sku: 'A', count: 12, mean: 4.5 },
    { sku: 'B', count: 300, mean: 4.1 },
  ],
};

type Heavy = { running: number; queued: number } | undefined;
const heavyNow = async (): Promise<Heavy> =>
  ((await request(t.app).get('/api/health')).body as { heavy?: Heavy }).heavy;

/** Starts a maximum-size score request and resolves once the server reports it running in a worker. */
async function startHeavy(agent: Agent) {
  const state = { done: false };
  const response = agent
    .post('/api/score')
    .set('x-csrf-token', agent.csrf)
    .send(maxBody)
    .then((res) => {
      state.done = true;
      return res;
    });
  for (;;) {
    if (state.done) throw new Error('the score request ended before any health request saw it running');
    if (((await heavyNow())?.running ?? 0) >= 1) break;
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
  return { state, response };
}

describe('heavy requests and everyone else', () => {
  it('answers /api/health sent after a maximum-size score request started before that request ends', async () => {
    const heavy = await startHeavy(analyst);
    const health = await request(t.app).get('/api/health').expect(200);
    expect(heavy.state.done).toBe(false);
    expect(health.body.heavy.running).toBe(1);
    const res = await heavy.response;
    expect(res.status).toBe(200);
    // The answer is one page of at most 10,000 items (SCORE_PAGE_MAX), whatever the request's size.
    expect(res.body.items).toHaveLength(10_000);
    expect(res.body.page).toEqual({ offset: 0, limit: 10_000, total: 200_000 });
  });

  it('pages the scored items with offset and limit, the same items as the whole answer', async () => {
    const three = { items: [...smallBody.items, { sku: 'C', count: 40, mean: 3.2 }] };
    const post = (body: object) =>
      analyst.post('/api/score').set('x-csrf-token', analyst.csrf).send(body).expect(200);
    const whole = await post(three);
    const page = await post({ ...three, offset: 1, limit: 1 });
    expect(page.body.page).toEqual({ offset: 1, limit: 1, total: 3 });
    expect(page.body.items).toEqual([whole.body.items[1]]);
    expect(page.body.category).toEqual(whole.body.category);
    const tooMany = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .send({ ...three, limit: 10_001 })
      .expect(400);
    expect(tooMany.body.error.message).toMatch(/at most 10000/);
  });

  it('answers 429 with Retry-After past one caller’s limit, and 503 with Retry-After when the pool is full', async () => {
    const heavy = await startHeavy(analyst);

    const again = await analyst.post('/api/score').set('x-csrf-token', analyst.csrf).send(smallBody);
    expect(again.status).toBe(429);
    expect(Number(again.headers['retry-after'])).toBeGreaterThan(0);
    expect(again.body.error.code).toBe('too_many_requests');
    expect(again.body.error.message).toMatch(/heavy requests running/);
    // The limit comes before the body is read: a body no one parsed on the event loop, even a broken one.
    const broken = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .set('content-type', 'application/json')
      .send('{"items": [');
    expect(broken.status).toBe(429);

    // Another person is not held to the analyst's limit, but the one worker is busy and nothing may wait.
    const other = await manager.post('/api/score').set('x-csrf-token', manager.csrf).send(smallBody);
    expect(other.status).toBe(503);
    expect(Number(other.headers['retry-after'])).toBeGreaterThan(0);
    expect(other.body.error.code).toBe('server_busy');

    expect((await heavy.response).status).toBe(200);
    const after = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .send(smallBody)
      .expect(200);
    expect(after.body.items).toHaveLength(2);
    // Parsed in the worker, a broken body answers as express.json answers one (error-handler.ts).
    const unreadable = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .set('content-type', 'application/json')
      .send('{"items": [')
      .expect(400);
    expect(unreadable.body.error).toEqual({
      code: 'bad_request',
      message: 'The request body is not valid JSON.',
    });
    expect(await heavyNow()).toEqual({ running: 0, queued: 0 });
  });

  it('parses an import preview in the worker pool: refused with 503 while the one worker is busy', async () => {
    const heavy = await startHeavy(analyst);
    const preview = () =>
      admin
        .post('/api/imports/preview')
        .set('x-csrf-token', admin.csrf)
        .field('kind', 'reviews')
        .attach('file', Buffer.from('sku,title\n'), 'one.csv');
    const busy = await preview();
    expect(heavy.state.done).toBe(false);
    expect(busy.status).toBe(503);
    expect(busy.body.error.code).toBe('server_busy');
    expect((await heavy.response).status).toBe(200);
    const read = await preview().expect(200);
    expect(read.body.fileError.code).toBe('missing_column');
  });

  it('renders a digest in the worker pool: it waits for the busy worker instead of being refused', async () => {
    const snapshot = await Snapshot.findOne({ order: [['isoWeek', 'DESC']] });
    const category = await Category.findByPk(snapshot!.categoryId);
    const heavy = await startHeavy(analyst);
    const state = { done: false };
    const produced = admin
      .post('/api/digests/produce')
      .set('x-csrf-token', admin.csrf)
      .send({ isoWeek: snapshot!.isoWeek, categories: [category!.slug], mail: false })
      .then((res) => {
        state.done = true;
        return res;
      });
    // The rendering is queued behind the score request: the pool reports it waiting (bounded poll).
    for (let tries = 0; ((await heavyNow())?.queued ?? 0) < 1; tries++) {
      if (tries > 2_000 || state.done) throw new Error('the digest never waited for the worker pool');
      await new Promise((resolve) => setTimeout(resolve, 25));
    }
    expect(heavy.state.done).toBe(false);
    expect((await heavy.response).status).toBe(200);
    const res = await produced;
    expect(res.status).toBe(200);
    expect(res.body.digests.some((d: { category: string | null }) => d.category === category!.slug)).toBe(
      true,
    );
  });
});
