import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDatabase, db } from '../../server/db/sequelize';
import { demoStory } from '../../server/demo/scenario';
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
  await loadDemoForTests({ weeks: 8 });
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

async function signedIn(role: 'analyst' | 'manager', width: number): Promise<Page> {
  const account = demoAccounts.find((a) => a.role === role)!;
  const context = await browser.newContext({
    viewport: { width, height: 900 },
    timezoneId: 'Europe/Amsterdam',
  });
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return page;
}

const shot = (page: Page, name: string) =>
  page.screenshot({ path: path.join(screenshotDir, name), fullPage: true });
const pageWidth = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth);

describe('standings at 390 px and 1440 px', () => {
  it('keeps the page within the screen and scrolls the table inside its own frame', async () => {
    for (const width of [1440, 390]) {
      const page = await signedIn('analyst', width);
      await page.goto(`${server.url}/categories/kettles-and-brewers`);
      await page.getByTestId('standings-frame').locator('tbody tr').first().waitFor();
      await expect.poll(() => pageWidth(page)).toBeLessThanOrEqual(width);
      const exportLink = await page.getByRole('link', { name: 'Export CSV' }).boundingBox();
      expect(exportLink!.x + exportLink!.width).toBeLessThanOrEqual(width);
      if (width === 390) {
        const frame = await page
          .getByTestId('standings-frame')
          .evaluate((el) => ({ scroll: el.scrollWidth, client: el.clientWidth }));
        expect(frame.scroll).toBeGreaterThan(frame.client);
      }
      await expect
        .poll(() => page.getByTestId('m-strategy').textContent())
        .toMatch(/review count|value|credibility/);
      await shot(page, `standings-${width}.png`);
      await page.context().close();
    }
  });

  it('takes the search placeholder from the category on screen', async () => {
    const page = await signedIn('analyst', 1440);
    await page.goto(`${server.url}/categories/trail-packs`);
    const search = page.getByRole('searchbox');
    await expect.poll(() => search.getAttribute('placeholder')).toMatch(/^e\.g\. TP-/);
    await page.context().close();
  });

  it('moves between the category tabs with the arrow keys, Home and End', async () => {
    const page = await signedIn('analyst', 1440);
    await page.goto(`${server.url}/categories/kettles-and-brewers`);
    const tab = (name: string) => page.getByRole('tab', { name });
    await tab('Standings').focus();
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => tab('Drift chart').getAttribute('aria-selected')).toBe('true');
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe('tab-drift');
    expect(await tab('Standings').getAttribute('tabindex')).toBe('-1');
    await page.keyboard.press('End');
    await expect.poll(() => tab('What-if').getAttribute('aria-selected')).toBe('true');
    await page.keyboard.press('ArrowRight');
    await expect.poll(() => tab('Standings').getAttribute('aria-selected')).toBe('true');
    await page.keyboard.press('ArrowLeft');
    await expect.poll(() => tab('What-if').getAttribute('aria-selected')).toBe('true');
    await page.keyboard.press('Home');
    await expect.poll(() => tab('Standings').getAttribute('aria-selected')).toBe('true');
    await page.context().close();
  });
});

describe('item screen', () => {
  it('lists ranks newest first without empty weeks, names the start page as the navigation does', async () => {
    for (const width of [1440, 390]) {
      const page = await signedIn('manager', width);
      await page.goto(`${server.url}/categories/kettles-and-brewers/items/${demoStory.thinLeader.sku}`);
      await page.getByText('Ranks as a table').click();
      const rows = page.getByTestId('timeline-table').locator('tbody tr');
      await rows.first().waitFor();
      const weeks = await rows.locator('td:first-child').allTextContents();
      expect(weeks).toEqual([...weeks].sort().reverse());
      expect((await rows.allTextContents()).some((r) => r.includes('—'))).toBe(false);
      const crumb = page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link').first();
      expect(await crumb.textContent()).toBe('My categories');
      expect(await page.locator('body').textContent()).not.toMatch(/today before the cut-off|\b1 reviews\b/);
      await expect.poll(() => pageWidth(page)).toBeLessThanOrEqual(width);
      await shot(page, `item-${width}.png`);
      await page.context().close();
    }
  });
});
