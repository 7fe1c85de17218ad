import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDatabase, db } from '../../server/db/sequelize';
import { shiftIsoWeek } from '../../shared/iso-week';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests, testDemoAsOf } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

/*
 * Issue 14 point 5: when a review dated inside the week arrives after the week's snapshot, the what-if
 * panel says so and offers an administrator the recompute; a week whose evidence is unchanged has no
 * banner. Point 3: the strategy that set m stands beside m on both sides. Invented demo data.
 */
let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;
let week = '';
let previousWeek = '';

beforeAll(async () => {
  database = await createTestDatabase();
  await seedDemo(() => {});
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 4 });
  // The demo's rows arrive when its snapshots are taken; add one review dated inside the latest week of
  // Trail Packs that arrives a day after that week's snapshot.
  const [latest] = (await db().query(
    `SELECT s.iso_week, s.cutoff, MIN(i.id) AS item_id FROM snapshots s JOIN categories c ON c.id = s.category_id
     JOIN items i ON i.category_id = c.id WHERE c.slug = 'trail-packs'
     GROUP BY s.id ORDER BY s.iso_week DESC LIMIT 1`,
  )) as [{ iso_week: string; cutoff: Date; item_id: number }[], unknown];
  week = latest[0]!.iso_week;
  await db().query(
    `INSERT INTO reviews (item_id, external_id, stars, reviewed_at, helpful_yes, helpful_no, created_at, updated_at)
     VALUES (:item, 'late-e2e-1', 1, :at, 0, 0, :arrived, :arrived)`,
    {
      replacements: {
        item: latest[0]!.item_id,
        at: new Date(new Date(latest[0]!.cutoff).getTime() - 86_400_000),
        arrived: new Date(testDemoAsOf.getTime() + 86_400_000),
      },
    },
  );
  previousWeek = shiftIsoWeek(week, -1);
  // Portable Power's latest snapshot as if credibility could not be estimated and m fell back.
  await db().query(
    `UPDATE snapshots s JOIN categories c ON c.id = s.category_id
     SET s.params = JSON_SET(s.params, '$.priorWeightStrategy', 'credibility', '$.priorWeightApplied', 'total')
     WHERE c.slug = 'portable-power' AND s.iso_week = :week`,
    { replacements: { week } },
  );
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

async function signedIn(role: 'admin' | 'analyst' | 'manager', width: number): Promise<Page> {
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

describe('what-if after late evidence', () => {
  it('shows the banner and offers an administrator the recompute, at 1440 and 390 px', async () => {
    for (const width of [1440, 390]) {
      const page = await signedIn('admin', width);
      await page.goto(`${server.url}/categories/trail-packs?view=what-if&week=${week}`);
      const banner = page.getByTestId('what-if-evidence-changed');
      await banner.getByText(`The evidence for ${week} has changed since its snapshot was taken.`).waitFor();
      await banner.getByText('1 review dated before the cut-off arrived after it was taken').waitFor();
      await banner.getByRole('button', { name: `Recompute ${week}` }).waitFor();
      await page.screenshot({
        path: path.join(screenshotDir, `what-if-evidence-${width}.png`),
        fullPage: true,
      });
      await page.context().close();
    }
  });

  it('tells an analyst who may recompute instead of offering the button', async () => {
    const page = await signedIn('analyst', 1440);
    await page.goto(`${server.url}/categories/trail-packs?view=what-if&week=${week}`);
    await page
      .getByTestId('what-if-evidence-changed')
      .getByText('Operations staff or an administrator can recompute the snapshot.')
      .waitFor();
    await page.context().close();
  });

  it('shows no banner where the evidence is what the snapshot saw, in another category or an earlier week', async () => {
    const page = await signedIn('admin', 1440);
    for (const url of [
      `/categories/kettles-and-brewers?view=what-if&week=${week}`,
      `/categories/trail-packs?view=what-if&week=${previousWeek}`,
    ]) {
      await page.goto(`${server.url}${url}`);
      await page.getByTestId('what-if-table').locator('tbody tr').first().waitFor();
      expect(await page.getByTestId('what-if-evidence-changed').count(), url).toBe(0);
    }
    await page.context().close();
  });
});

describe('what-if: the strategy that set m', () => {
  it('stands beside m on the saved side and in the preview, fallbacks named', async () => {
    const page = await signedIn('manager', 1440);
    await page.goto(`${server.url}/categories/portable-power?view=what-if&week=${week}`);
    const strategy = page.getByTestId('what-if-m-strategy');
    await expect
      .poll(() => strategy.textContent())
      .toBe(
        'Strategy applied for m: total review count, a fallback: credibility could not be estimated → mean review count',
      );
    await page.getByLabel('Prior weight (m)').selectOption({ label: 'Smallest review count' });
    await expect
      .poll(() => strategy.textContent())
      .toBe(
        'Strategy applied for m: total review count, a fallback: credibility could not be estimated → smallest review count',
      );
    await page.screenshot({ path: path.join(screenshotDir, 'what-if-m-strategy-1440.png'), fullPage: true });
    await page.context().close();
  });
});
