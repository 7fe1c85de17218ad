import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Category, CategoryOwner, Item, Review, User } from '../../server/db/models';
import { closeDatabase } from '../../server/db/sequelize';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { takeSnapshot } from '../../server/modules/snapshots/snapshots.service';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { testDemoAsOf } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

/*
 * Security requirement: markup in category names, item titles and review text is inert in the web UI.
 * Every payload either sets window.__xss, opens a dialog or leaves an element behind if it ever runs or
 * is parsed as HTML. The CSP (script-src 'self') would block most of them from running, but it reports
 * each refused handler as a console error, so a rendering regression still fails here three ways.
 */

const slug = 'hostile-packs';
const categoryName = `<img src=x onerror="window.__xss=1">Packs & "Co" <script>window.__xss=2</script>`;
const description = `<iframe src="javascript:window.__xss=8"></iframe><b>Invented</b> packs for the Ballast hostile-text test.`;
const phrase = '<b onmouseover=window.__xss=7>strap</b>';
const clusterBody = `The ${phrase} gave way on day two </blockquote><img src=x onerror=alert('ballast')>`;
const helpfulBody = `"><script>alert('ballast review')</script> Sturdy frame &amp; zips fine`;
const noteText = `<img src=x onerror=alert('note')>Shelf order from the Ballast test & "friends"`;

type SeedReview = { stars: number; at: string; body?: string; helpfulYes?: number };

/** `count` reviews from `from`, every `everyDays` days, cycling through `stars`. */
function spread(
  count: number,
  from: string,
  everyDays: number,
  stars: number[],
  body?: string,
): SeedReview[] {
  const start = new Date(`${from}T12:00:00Z`).getTime();
  return Array.from({ length: count }, (_, k) => ({
    stars: stars[k % stars.length]!,
    at: new Date(start + k * everyDays * 86_400_000).toISOString().slice(0, 10),
    ...(body ? { body } : {}),
  }));
}

const items: { sku: string; title: string; reviews: SeedReview[] }[] = [
  {
    // A year of good reviews, then a run of one-star reviews that all name the cluster phrase.
    sku: 'HX-1',
    title: '<svg onload=window.__xss=3>Ridge pack',
    reviews: [
      ...spread(40, '2025-09-01', 8, [5, 4, 5, 5, 4]),
      ...spread(2, '2026-09-15', 1, [5]),
      ...spread(6, '2026-10-01', 1, [1], clusterBody).map((r, k) => ({ ...r, helpfulYes: 5 + k })),
    ],
  },
  {
    sku: 'HX-2',
    title: `"><script>window.__xss=4</script>Daypack`,
    reviews: [
      ...spread(18, '2026-01-05', 14, [5, 5, 4, 3, 5]),
      { stars: 5, at: '2026-10-20', body: helpfulBody, helpfulYes: 4 },
      { stars: 4, at: '2026-10-21', body: helpfulBody, helpfulYes: 2 },
    ],
  },
  { sku: 'HX-3', title: 'javascript:window.__xss=5', reviews: spread(10, '2026-03-01', 20, [4, 4, 5, 3, 4]) },
  {
    // Nothing newer than May 2025: stale in November 2026, so it shows on the freshness tab as well.
    sku: 'HX-4',
    title: `{{constructor.constructor('window.__xss=6')()}} Sling`,
    reviews: spread(5, '2025-03-01', 20, [5, 5, 5, 5, 4]),
  },
  { sku: 'HX-5', title: 'Plain Ballast test pack', reviews: spread(30, '2026-02-01', 7, [4, 3, 4, 5, 4]) },
  {
    sku: 'HX-6',
    title: `<a href="javascript:window.__xss=9">Open me</a> & <b>bold</b> roll-top`,
    reviews: spread(3, '2026-11-02', 1, [5]),
  },
];
const titleOf = (sku: string) => items.find((i) => i.sku === sku)!.title;
const hostileSkus = ['HX-1', 'HX-2', 'HX-3', 'HX-4', 'HX-6'];

let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  database = await createTestDatabase();
  // Accounts and the demo categories only: without `reviews` the seed writes no items, reviews or snapshots.
  await seedDemo(() => {});
  const category = await Category.create({
    slug,
    name: categoryName,
    description,
    settings: { clusterPhrases: [phrase] },
  });
  const manager = await User.findOne({
    where: { email: demoAccounts.find((a) => a.role === 'manager')!.email },
  });
  await CategoryOwner.create({ categoryId: category.id, userId: manager!.id });
  let n = 0;
  for (const spec of items) {
    const item = await Item.create({
      categoryId: category.id,
      sku: spec.sku,
      title: spec.title,
      brand: null,
      url: null,
    });
    await Review.bulkCreate(
      spec.reviews.map((r) => ({
        itemId: item.id,
        externalId: `hx-${(n += 1)}`,
        stars: r.stars,
        reviewedAt: new Date(`${r.at}T12:00:00Z`),
        helpfulYes: r.helpfulYes ?? 0,
        helpfulNo: 0,
        reviewerExternalId: null,
        reviewerScore: null,
        verified: null,
        body: r.body ?? null,
        importBatchId: null,
      })),
    );
  }
  for (const isoWeek of ['2026-W46', '2026-W47'])
    await takeSnapshot({ categoryId: category.id, isoWeek, now: testDemoAsOf });
  await closeDatabase();
  server = await startServerProcess(database.url);
  ({ browser, close: closeBrowser } = await launchBrowser());
}, 120_000);

afterAll(async () => {
  await closeBrowser?.();
  await server?.stop();
  const { openDatabase } = await import('../../server/db/sequelize');
  openDatabase(database.url);
  await database.drop();
});

type Watched = { page: Page; dialogs: string[]; errors: string[] };

async function signedIn(role: 'admin' | 'manager'): Promise<Watched> {
  const account = demoAccounts.find((a) => a.role === role)!;
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, timezoneId: 'UTC' });
  const page = await context.newPage();
  const watched: Watched = { page, dialogs: [], errors: [] };
  page.on('dialog', (dialog) => {
    watched.dialogs.push(`${dialog.type()}: ${dialog.message()}`);
    void dialog.dismiss();
  });
  page.on('console', (msg) => {
    if (msg.type() === 'error') watched.errors.push(msg.text());
  });
  page.on('pageerror', (error) => watched.errors.push(error.message));
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return watched;
}

/** Nothing ran, nothing asked for a dialog, the CSP refused nothing, and no payload became an element. */
async function expectInert({ page, dialogs, errors }: Watched, screen: string): Promise<void> {
  expect(
    await page.evaluate(() => (window as unknown as { __xss?: unknown }).__xss),
    `${screen}: window.__xss`,
  ).toBeUndefined();
  const injected = await page.evaluate(() => {
    const count = (selector: string) => document.querySelectorAll(selector).length;
    return {
      inlineHandlers: count('[onload], [onerror], [onmouseover], [onclick]'),
      imgX: count('img[src="x"]'),
      scriptsInBody: count('body script'),
      javascriptUrls: count('[href^="javascript:" i], [src^="javascript:" i]'),
      boldInMain: count('main b'),
    };
  });
  expect(injected, `${screen}: elements made from payloads`).toEqual({
    inlineHandlers: 0,
    imgX: 0,
    scriptsInBody: 0,
    javascriptUrls: 0,
    boldInMain: 0,
  });
  expect(dialogs, `${screen}: dialogs`).toEqual([]);
  expect(errors, `${screen}: console errors (CSP reports included)`).toEqual([]);
}

const h1 = (page: Page) => page.getByRole('heading', { level: 1 });

describe('hostile text in the web UI', () => {
  it('shows markup in category names, item titles and review text as text on every screen, running none of it', async () => {
    const w = await signedIn('admin');
    const { page } = w;

    await page.goto(`${server.url}/`);
    const card = page
      .getByRole('list', { name: 'Categories' })
      .getByRole('link', { name: categoryName, exact: true });
    await card.waitFor();
    expect(await card.textContent()).toBe(categoryName);
    await expectInert(w, 'overview');

    await page.goto(`${server.url}/categories/${slug}`);
    await expect.poll(() => h1(page).textContent()).toBe(categoryName);
    expect(await page.locator('main header p').first().textContent()).toContain(
      `${description} Week 2026-W47`,
    );
    const titleCells = page.getByRole('table').locator('tbody tr td a[href*="/items/"] > span:first-child');
    await expect.poll(() => titleCells.count()).toBe(items.length);
    expect((await titleCells.allTextContents()).sort()).toEqual(items.map((i) => i.title).sort());
    await page.getByText('<script>window.__xss=2</script>', { exact: false }).first().waitFor();
    await page.screenshot({ path: path.join(screenshotDir, 'hostile-text-standings.png'), fullPage: true });
    await expectInert(w, 'standings');

    await page.goto(`${server.url}/categories/${slug}?view=freshness`);
    const stale = page.getByRole('table').getByRole('link', { name: titleOf('HX-4'), exact: true });
    await stale.waitFor();
    expect(await stale.textContent()).toBe(titleOf('HX-4'));
    await expectInert(w, 'freshness');

    await page.goto(`${server.url}/categories/${slug}?view=what-if`);
    const previewTitles = page
      .getByTestId('what-if-table')
      .locator('tbody tr td a[href*="/items/"] > span:first-child');
    await expect.poll(() => previewTitles.count()).toBe(items.length);
    expect((await previewTitles.allTextContents()).sort()).toEqual(items.map((i) => i.title).sort());
    await expectInert(w, 'what-if');

    for (const sku of hostileSkus) {
      await page.goto(`${server.url}/categories/${slug}/items/${sku}`);
      await expect.poll(() => h1(page).textContent()).toBe(titleOf(sku));
      const crumb = page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link').nth(1);
      expect(await crumb.textContent()).toBe(categoryName);
      await page.getByRole('heading', { name: 'Rank over time' }).waitFor();
      await page.getByTestId('what-it-takes').waitFor();
      await expectInert(w, `item ${sku}`);
    }

    // The cluster item: review text in "Most helpful reviews" and the configured phrase in the flag reason.
    await page.goto(`${server.url}/categories/${slug}/items/HX-1`);
    const quotes = page.locator('section[aria-labelledby="helpful"] blockquote');
    await expect.poll(() => quotes.count()).toBe(3);
    expect(new Set(await quotes.allTextContents())).toEqual(new Set([clusterBody]));
    const flags = page.locator('section[aria-labelledby="flags"]');
    await expect.poll(() => flags.textContent()).toContain(`recurring: “${phrase}” ×6.`);
    // Another item's title, shown as the one to overtake.
    expect(await page.getByText(/^Next above: /).textContent()).toBe(`Next above: ${titleOf('HX-6')} (HX-6)`);
    await expectInert(w, 'item HX-1 reviews and flags');

    await page.goto(`${server.url}/categories/${slug}/items/HX-2`);
    const helpful = page.locator('section[aria-labelledby="helpful"] blockquote');
    await expect.poll(() => helpful.count()).toBe(2);
    expect(await helpful.allTextContents()).toEqual([helpfulBody, helpfulBody]);
    await expectInert(w, 'item HX-2 reviews');

    await page.goto(`${server.url}/calibrate`);
    const choice = page
      .getByRole('list', { name: 'Categories to calibrate' })
      .getByRole('link')
      .filter({ hasText: 'Packs & "Co"' });
    await choice.waitFor();
    expect(await choice.locator('span').allTextContents()).toEqual([categoryName, description]);
    await expectInert(w, 'calibration chooser');

    // A note typed in the browser goes to the server and comes back as text.
    await page.goto(`${server.url}/categories/${slug}/calibrate`);
    await expect.poll(() => h1(page).textContent()).toBe(`Calibrate ${categoryName}`);
    await page
      .getByLabel('Skus, best first')
      .fill(['sku', 'HX-2', 'HX-5', 'HX-1', 'HX-3', 'HX-6', 'HX-4'].join('\n'));
    await page.getByRole('button', { name: 'Run calibration' }).click();
    await page.getByTestId('best-interval').waitFor();
    await page.getByLabel(/^Note/).fill(noteText);
    await page.getByRole('button', { name: 'Save as a note' }).click();
    await page.getByText('Saved to the category.').waitFor();
    const note = page.locator('section[aria-labelledby="notes-heading"] li span.font-semibold');
    await expect.poll(() => note.allTextContents()).toEqual([noteText]);
    await expectInert(w, 'calibrate');

    await page.goto(`${server.url}/admin/people`);
    const ownerRow = page.getByRole('rowheader', { name: categoryName, exact: true });
    await ownerRow.waitFor();
    expect(await ownerRow.textContent()).toBe(categoryName);
    const ownerName = demoAccounts.find((a) => a.role === 'manager')!.name;
    expect(
      await page
        .getByRole('checkbox', { name: `${ownerName} owns ${categoryName}`, exact: true })
        .isChecked(),
    ).toBe(true);
    await expectInert(w, 'people & ownership');

    await page.goto(`${server.url}/admin/tokens`);
    const tokenChoice = page.getByRole('checkbox', { name: categoryName, exact: true });
    await tokenChoice.waitFor();
    await expectInert(w, 'API tokens');

    await page.goto(`${server.url}/schedules`);
    await page.getByRole('button', { name: 'New schedule' }).click();
    await page.getByLabel('Chosen categories').check();
    await page.getByRole('checkbox', { name: categoryName, exact: true }).waitFor();
    await expectInert(w, 'schedules');

    for (const [screen, select] of [
      ['jobs', page.getByRole('combobox', { name: /^Category/ })],
      ['digests', page.getByRole('combobox', { name: /^Digest of/ })],
    ] as const) {
      await page.goto(`${server.url}/${screen}`);
      await h1(page).waitFor();
      await expect.poll(() => select.locator('option').allTextContents()).toContain(categoryName);
      await expectInert(w, screen);
    }
    await page.context().close();
  });

  it("shows the owning manager the category's name as text in their overview and digest choices", async () => {
    const w = await signedIn('manager');
    const { page } = w;
    await page.goto(`${server.url}/`);
    await page.getByRole('heading', { name: 'My categories', level: 1 }).waitFor();
    const card = page
      .getByRole('list', { name: 'Categories' })
      .getByRole('link', { name: categoryName, exact: true });
    await card.waitFor();
    await expectInert(w, 'my categories');

    await page.goto(`${server.url}/my-digests`);
    const label = page.locator('li p.font-semibold', { hasText: 'Packs & "Co"' });
    await expect.poll(() => label.allTextContents()).toEqual([categoryName]);
    await expectInert(w, 'my digests');
    await page.context().close();
  });
});
