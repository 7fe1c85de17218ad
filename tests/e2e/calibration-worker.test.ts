import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { calibrate, type ItemInput, type ScoringSettings } from '../../shared/scoring';
import type { WhatIfEvidence } from '../../shared/schemas/standings.schema';
import { closeDatabase, db } from '../../server/db/sequelize';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  database = await createTestDatabase();
  await seedDemo(() => {});
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 2 });
  await closeDatabase();
  server = await startServerProcess(database.url);
  ({ browser, close: closeBrowser } = await launchBrowser());
}, 300_000);

afterAll(async () => {
  await closeBrowser?.();
  await server?.stop();
  const { openDatabase } = await import('../../server/db/sequelize');
  openDatabase(database.url);
  await database.drop();
});

async function signedIn(): Promise<{ page: Page; problems: string[] }> {
  const account = demoAccounts.find((a) => a.role === 'analyst')!;
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  const problems: string[] = [];
  page.on('console', (msg) => {
    if (msg.type() === 'error') problems.push(msg.text());
  });
  page.on('pageerror', (err) => problems.push(err.message));
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return { page, problems };
}

async function evidenceOf(page: Page): Promise<WhatIfEvidence> {
  const answer = await page.request.get(`${server.url}/api/categories/trail-packs/what-if`);
  expect(answer.status()).toBe(200);
  return (await answer.json()) as WhatIfEvidence;
}

/** Polls a condition with a bound; no fixed sleeps. */
async function until(check: () => Promise<boolean>, what: string, boundMs = 60_000) {
  const deadline = Date.now() + boundMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`Gave up waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('calibration in a Web Worker', () => {
  it('finishes with the result the engine gives on the server side', async () => {
    const { page, problems } = await signedIn();
    const evidence = await evidenceOf(page);
    const observed = (evidence.items as unknown as { sku: string }[]).map((i) => i.sku).reverse();
    await page.goto(`${server.url}/categories/trail-packs/calibrate`);
    await page.getByRole('heading', { name: 'Calibrate Trail Packs' }).waitFor();
    await page.getByLabel('Skus, best first').fill(observed.join('\n'));
    await page.getByRole('button', { name: 'Run calibration' }).click();
    const best = page.getByTestId('best-interval');
    await best.waitFor();
    // The same shared engine in Node, as the worker pool behind POST /api/calibrations runs it.
    const expected = calibrate(
      evidence.items as unknown as ItemInput[],
      observed,
      evidence.settings as unknown as Partial<ScoringSettings>,
      { asOf: evidence.asOf, unexplainedCount: 10 },
    );
    expect(Number(await best.getAttribute('data-start'))).toBe(expected.best.start);
    const end = await best.getAttribute('data-end');
    expect(end === '' ? null : Number(end)).toBe(expected.best.end);
    await page.getByText(`${expected.swapPointCount} swap points examined`).waitFor();
    expect(problems).toEqual([]);
    await page.context().close();
  });

  it('shows progress on a large category and cancels back to idle with no result', async () => {
    const { page, problems } = await signedIn();
    const evidence = await evidenceOf(page);
    // A large invented category: the demo's items repeated under new skus, with counts spread out so
    // that the search has many swap points to go through.
    const base = evidence.items as unknown as Record<string, unknown>[];
    const copies = Math.ceil(20_000 / base.length);
    const items = Array.from({ length: copies }, (_, k) =>
      base.map((item) => ({ ...item, sku: `${String(item.sku)}-C${k}` })),
    ).flat();
    await page.route('**/api/categories/trail-packs/what-if*', (route) =>
      route.fulfill({ json: { ...evidence, items } }),
    );
    await page.goto(`${server.url}/categories/trail-packs/calibrate`);
    await page.getByRole('heading', { name: 'Calibrate Trail Packs' }).waitFor();
    let seed = 11;
    const observed = items.map((i) => i.sku);
    for (let i = observed.length - 1; i > 0; i--) {
      seed = (seed * 1103515245 + 12345) % 2147483648;
      const j = seed % (i + 1);
      [observed[i], observed[j]] = [observed[j]!, observed[i]!];
    }
    await page.getByLabel('Or upload a CSV').setInputFiles({
      name: 'observed.txt',
      mimeType: 'text/plain',
      buffer: Buffer.from(observed.join('\n')),
    });
    await page.getByText(`${observed.length} matched to items`).waitFor();
    await page.getByRole('button', { name: 'Run calibration' }).click();
    const bar = page.getByRole('progressbar', { name: 'Calibration progress' });
    await bar.waitFor();
    await until(async () => Number(await bar.getAttribute('aria-valuenow')) > 0, 'progress above 0');
    await page.screenshot({ path: path.join(screenshotDir, 'calibrate-progress.png') });
    // The page answers while the search runs: the textarea still takes focus and reports its value.
    expect(
      await page.getByLabel('Skus, best first').evaluate((el) => (el as HTMLTextAreaElement).value.length),
    ).toBeGreaterThan(0);
    await page.getByRole('button', { name: 'Cancel' }).click();
    await bar.waitFor({ state: 'detached' });
    expect(await page.getByRole('button', { name: 'Cancel' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: 'Run calibration' }).isEnabled()).toBe(true);
    expect(await page.getByTestId('calibration-result').count()).toBe(0);
    expect(problems).toEqual([]);
    await page.context().close();
  });
});
