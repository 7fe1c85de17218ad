import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDatabase, db } from '../../server/db/sequelize';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

/* The analyst reads how sure each rank is (issue 19): rank ranges in the standings, the band on an item's chart. */
let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  database = await createTestDatabase();
  await seedDemo(() => {});
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 3 });
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

async function analyst(): Promise<Page> {
  const account = demoAccounts.find((a) => a.role === 'analyst')!;
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in`);
  // A loaded machine can take a while to serve the first page.
  await page.getByLabel('E-mail').waitFor({ timeout: 120_000 });
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return page;
}

describe('rank ranges in the browser', () => {
  it('shows a rank range beside each smoothed rank, sorts by it, and draws the band on the item chart', async () => {
    const page = await analyst();
    await page.goto(`${server.url}/categories/portable-power`);
    const ranges = page.getByTestId('rank-range');
    await ranges.first().waitFor({ timeout: 120_000 });
    const texts = await ranges.allTextContents();
    expect(texts.length).toBeGreaterThan(5);
    for (const t of texts) expect(t).toMatch(/^\d+(–\d+)?$/);
    await expect
      .poll(() => page.getByText('Rank range: with the evidence so far').count())
      .toBeGreaterThan(0);
    await page.screenshot({ path: path.join(screenshotDir, 'rank-ranges-standings.png'), fullPage: true });

    await page.getByRole('button', { name: /Rank range/ }).click();
    await expect.poll(() => page.url()).toContain('sort=rankRange');
    await ranges.first().waitFor();
    const widths = (await ranges.allTextContents()).map((t) => {
      const [a, b] = t.split('–').map(Number);
      return (b ?? a!) - a!;
    });
    expect(widths).toEqual([...widths].sort((x, y) => x - y));

    await page.getByRole('table').getByRole('link').first().click();
    const chart = page.getByRole('img', { name: /Latest 90 % rank range: \d+(–\d+)?\./ });
    await chart.waitFor({ timeout: 120_000 });
    await page.screenshot({ path: path.join(screenshotDir, 'rank-ranges-item.png'), fullPage: true });
  }, 300_000);
});
