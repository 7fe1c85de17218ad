import { execFile } from 'node:child_process';
import { readFileSync, writeFileSync, mkdtempSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../../server/config/env';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

const run = promisify(execFile);
const sample = path.join(rootDir, 'templates/score/score-request.sample.json');
const cli = (file: string) =>
  run(process.execPath, ['--import', 'tsx', path.join(rootDir, 'server/scripts/score.ts'), file], {
    cwd: rootDir,
  });

let t: TestApp;
let analyst: Agent;
beforeAll(async () => {
  t = await setupTestApp();
  analyst = await t.signIn('analyst');
});
afterAll(async () => t.close());

describe('POST /api/score', () => {
  it('scores the sample request: naive and smoothed orderings with the resolved m and C', async () => {
    const body = JSON.parse(readFileSync(sample, 'utf8')) as { items: { sku: string }[] };
    const res = await analyst.post('/api/score').set('x-csrf-token', analyst.csrf).send(body).expect(200);
    expect(res.body.items).toHaveLength(body.items.length);
    expect(res.body.resolved.priorWeightStrategy).toBe('mean');
    const { m, C } = res.body.resolved as { m: number; C: number };
    // Every smoothed score is the Bayesian average (m*C + n*r)/(m + n) of DESIGN §4.2.
    for (const item of res.body.items as { n: number; rawMean: number | null; smoothed: number }[]) {
      if (item.rawMean === null) continue;
      expect(item.smoothed).toBeCloseTo((m * C + item.n * item.rawMean) / (m + item.n), 10);
    }
    const ranks = (res.body.items as { smoothedRank: number }[])
      .map((i) => i.smoothedRank)
      .sort((a, b) => a - b);
    expect(ranks[0]).toBe(1);
  });

  it('answers 400 naming the field and the reason for a mean outside 1–5', async () => {
    const res = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .send({
        items: [
          { sku: 'A', count: 3, mean: 4 },
          { sku: 'B', count: 2, mean: 6 },
        ],
      })
      .expect(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.message).toBe('Mean of items entry 2: must be between 1 and 5');
    expect(res.body.error.details[0].path).toBe('items.1.mean');
  });

  it('answers 400 for an empty category and 401 without a session', async () => {
    const res = await analyst
      .post('/api/score')
      .set('x-csrf-token', analyst.csrf)
      .send({ items: [] })
      .expect(400);
    expect(res.body.error.message).toMatch(/^Items: /);
    const anonymous = await t.anonymous();
    await anonymous.post('/api/score').set('x-csrf-token', anonymous.csrf).send({ items: [] }).expect(401);
  });

  it('is described in the OpenAPI document', async () => {
    const res = await analyst.get('/api/openapi.json').expect(200);
    const op = res.body.paths['/api/score'].post;
    expect(op.requestBody.content['application/json'].schema.properties.items).toBeDefined();
    expect(op.responses['200'].content['application/json'].schema.properties.resolved).toBeDefined();
  });
});

describe('npm run score', () => {
  it('prints the same JSON as the API for the same request', async () => {
    const body = JSON.parse(readFileSync(sample, 'utf8')) as object;
    const api = await analyst.post('/api/score').set('x-csrf-token', analyst.csrf).send(body).expect(200);
    const { stdout } = await cli(sample);
    expect(JSON.parse(stdout)).toEqual(api.body);
  });

  it('reads the CSV form', async () => {
    const { stdout } = await cli(path.join(rootDir, 'templates/score/score-items.sample.csv'));
    const out = JSON.parse(stdout) as { items: unknown[]; resolved: { m: number } };
    expect(out.items.length).toBeGreaterThan(1);
    expect(out.resolved.m).toBeGreaterThan(0);
  });

  it('exits 1 with one clear line for bad input', async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'ballast-score-'));
    const bad = path.join(dir, 'bad.json');
    writeFileSync(bad, JSON.stringify({ items: [{ sku: 'A', count: -1, mean: 3 }] }));
    const failure = await cli(bad).then(
      () => null,
      (err: { code: number; stderr: string }) => err,
    );
    expect(failure?.code).toBe(1);
    expect(failure?.stderr.trim().split('\n')).toHaveLength(1);
    expect(failure?.stderr).toMatch(/items\.0\.count/);
    const missing = await cli(path.join(dir, 'nope.json')).then(
      () => null,
      (err: { code: number; stderr: string }) => err,
    );
    expect(missing?.code).toBe(1);
  });
});
