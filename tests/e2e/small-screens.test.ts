import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../server/config/env';
import { closeDatabase, db } from '../../server/db/sequelize';
import { demoStory } from '../../server/demo/scenario';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

/*
 * Issue 14 point 11: at 390 px no screen scrolls sideways as a whole; wide tables and charts scroll inside
 * their own frame. Every screen a reader meets after the standings page, at a phone's width and a desktop's.
 */
let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;
let trailPackSkus: string[] = [];

beforeAll(async () => {
  database = await createTestDatabase();
  await seedDemo(() => {});
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 8 });
  const [skus] = (await db().query(
    `SELECT i.sku FROM items i JOIN categories c ON c.id = i.category_id WHERE c.slug = 'trail-packs' ORDER BY i.sku`,
  )) as [{ sku: string }[], unknown];
  trailPackSkus = skus.map((s) => s.sku);
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

async function signedIn(
  role: 'admin' | 'ops' | 'analyst' | 'manager' | 'exec',
  width: number,
): Promise<Page> {
  const account = demoAccounts.find((a) => a.role === role)!;
  const context = await browser.newContext({ viewport: { width, height: 900 } });
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return page;
}

/** How far the page as a whole scrolls sideways: 0 when everything fits the screen. */
const sidewaysScroll = (page: Page) =>
  page.evaluate(() => {
    const root = document.scrollingElement!;
    return root.scrollWidth - root.clientWidth;
  });

/**
 * Controls and headings that reach past the page's content box, so part of them is cut or hidden; those in
 * tables are left out, as tables scroll inside their own frame.
 */
const cutControls = (page: Page) =>
  page.evaluate(() => {
    const main = document.querySelector('main')!;
    const style = getComputedStyle(main);
    const box = main.getBoundingClientRect();
    const left = box.left + parseFloat(style.paddingLeft) - 1;
    const right = box.right - parseFloat(style.paddingRight) + 1;
    return [...main.querySelectorAll('button, select, input, textarea, a, [role=tab], h1, h2, h3')]
      .filter((el) => !el.closest('table'))
      .filter((el) => {
        const r = el.getBoundingClientRect();
        return r.width > 1 && r.height > 1 && (r.left < left || r.right > right);
      })
      .map((el) => `${el.tagName.toLowerCase()} "${(el.textContent ?? '').trim().slice(0, 30)}"`);
  });

async function fitsAndShoot(page: Page, name: string, width: number) {
  await expect.poll(() => sidewaysScroll(page), { timeout: 10_000 }).toBeLessThanOrEqual(0);
  expect(await cutControls(page), `${name} at ${width} px`).toEqual([]);
  await page.screenshot({ path: path.join(screenshotDir, `small-${name}-${width}.png`), fullPage: true });
}

const widths = [1440, 390] as const;

describe('every screen at 390 px and 1440 px', () => {
  it('the start page stays within the screen for an executive', async () => {
    for (const width of widths) {
      const page = await signedIn('exec', width);
      await page.getByRole('heading', { level: 1 }).waitFor();
      await page.getByText('Rank agreement').first().waitFor();
      await fitsAndShoot(page, 'overview', width);
      await page.context().close();
    }
  });

  it('the drift, freshness and what-if tabs stay within the screen', async () => {
    for (const width of widths) {
      const page = await signedIn('analyst', width);
      await page.goto(`${server.url}/categories/trail-packs?view=drift`);
      await page.getByRole('tabpanel').locator('canvas').first().waitFor();
      await fitsAndShoot(page, 'drift', width);

      await page.goto(`${server.url}/categories/trail-packs?view=freshness`);
      await page.locator('#stale-heading').waitFor();
      await fitsAndShoot(page, 'freshness', width);

      await page.goto(`${server.url}/categories/trail-packs?view=what-if`);
      await page.getByTestId('what-if-table').locator('tbody tr').first().waitFor();
      await fitsAndShoot(page, 'what-if', width);
      await page.context().close();
    }
  });

  it('the item page stays within the screen with its charts and tables open', async () => {
    for (const width of widths) {
      const page = await signedIn('manager', width);
      await page.goto(`${server.url}/categories/kettles-and-brewers/items/${demoStory.thinLeader.sku}`);
      await page.getByText('Ranks as a table').click();
      await page.getByTestId('timeline-table').locator('tbody tr').first().waitFor();
      await fitsAndShoot(page, 'item', width);
      await page.context().close();
    }
  });

  it('the calibration screens stay within the screen, with a result on show', async () => {
    for (const width of widths) {
      const page = await signedIn('analyst', width);
      await page.goto(`${server.url}/calibrate`);
      await page.getByRole('heading', { level: 1 }).waitFor();
      await fitsAndShoot(page, 'calibrate-choose', width);
      await page.goto(`${server.url}/categories/trail-packs/calibrate`);
      await page.getByRole('heading', { name: 'Calibrate Trail Packs' }).waitFor();
      await page.getByLabel('Skus, best first').fill(['sku', ...trailPackSkus].join('\n'));
      await page.getByRole('button', { name: 'Run calibration' }).click();
      await page.getByTestId('best-interval').waitFor();
      await fitsAndShoot(page, 'calibrate', width);
      await page.context().close();
    }
  });

  it('the import screen stays within the screen, with a preview of bad rows', async () => {
    for (const width of widths) {
      const page = await signedIn('ops', width);
      await page.goto(`${server.url}/imports`);
      await page.getByRole('heading', { name: 'Imports', level: 1 }).waitFor();
      await page
        .getByLabel('Choose a CSV file to import')
        .setInputFiles(path.join(rootDir, 'templates', 'imports', 'reviews.with-mistakes.sample.csv'));
      await page.getByTestId('preview-raw').first().waitFor();
      await fitsAndShoot(page, 'imports', width);
      await page.context().close();
    }
  });
});
