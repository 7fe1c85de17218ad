import { readFile } from 'node:fs/promises';
import path from 'node:path';
import type { Browser, Download, Locator, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lastCompletedIsoWeek, shiftIsoWeek } from '../../shared/iso-week';
import { closeDatabase, db } from '../../server/db/sequelize';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests, testDemoAsOf } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

/*
 * The digest screens as their people use them, in Chromium against a real Ballast process with its own
 * local SMTP server: ops makes a "Snapshot + digest" schedule and runs it now; ops and admin read the
 * archive and the Outbox; the manager turns a digest off and on; the exec downloads the portfolio.
 */

type Role = 'admin' | 'ops' | 'manager' | 'exec';
const account = (role: Role) => demoAccounts.find((a) => a.role === role)!;

/**
 * "Run now" snapshots the last completed week by the clock. The demo's fixed data ends in that week (while
 * the calendar allows), so the run keeps the snapshot loaded below and goes on to the digest.
 */
const runWeek = lastCompletedIsoWeek(new Date());
/** A week before it, produced by hand through the API, so the archive has a timeline of two weeks. */
const olderWeek = shiftIsoWeek(lastCompletedIsoWeek(testDemoAsOf), -1);
const scheduleName = 'Portable power, Monday digest';
const extraRecipient = 'power-buyers@example.test';
const ppSubject = (week: string) => `Ballast · Portable Power · week ${week}`;
const portfolioSubject = (week: string) => `Ballast · Portfolio digest · week ${week}`;

let database: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  // The scenario's three snapshot weeks end at its fixed as-of; "run now" must not come before them.
  expect(runWeek >= lastCompletedIsoWeek(testDemoAsOf), "the machine's clock is before the demo").toBe(true);
  database = await createTestDatabase();
  await seedDemo(() => {});
  for (const table of ['snapshots', 'reviews', 'aggregate_observations', 'items'])
    await db().query(`DELETE FROM ${table}`);
  await loadDemoForTests({ weeks: 3 });
  await closeDatabase();
  server = await startServerProcess(database.url);
  ({ browser, close: closeBrowser } = await launchBrowser());
}, 180_000);

afterAll(async () => {
  await closeBrowser?.();
  await server?.stop();
  const { openDatabase } = await import('../../server/db/sequelize');
  openDatabase(database.url);
  await database.drop();
});

type PdfResponse = { url: string; status: number; type: string | undefined };
type Watched = { page: Page; errors: string[]; pdfs: PdfResponse[]; allowed: RegExp[] };

/** A fresh browser context signed in as `role`, recording console errors, page errors and PDF answers. */
async function signedIn(role: Role): Promise<Watched> {
  const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, timezoneId: 'UTC' });
  const page = await context.newPage();
  const watched: Watched = { page, errors: [], pdfs: [], allowed: [] };
  page.on('console', (msg) => {
    if (msg.type() !== 'error') return;
    const line = `${msg.text()} @ ${msg.location().url}`;
    if (!watched.allowed.some((pattern) => pattern.test(line))) watched.errors.push(line);
  });
  page.on('pageerror', (error) => watched.errors.push(`page error: ${error.message}`));
  page.on('response', (res) => {
    if (/\/digests\/[^/]+\/pdf\?disposition=inline$/.test(res.url()))
      watched.pdfs.push({ url: res.url(), status: res.status(), type: res.headers()['content-type'] });
  });
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(account(role).email);
  await page.getByLabel('Password').fill(account(role).password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return watched;
}

const nav = (page: Page, name: string) =>
  page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name, exact: true }).click();
const h1 = (page: Page, name: string) => page.getByRole('heading', { name, level: 1 }).waitFor();
const shot = (page: Page, name: string) =>
  page.screenshot({ path: path.join(screenshotDir, name), fullPage: true });

/** Clicks `link` and returns the file the browser saved, with its name and first bytes. */
async function download(page: Page, link: Locator): Promise<{ name: string; head: string }> {
  const [file]: [Download, void] = await Promise.all([page.waitForEvent('download'), link.click()]);
  const bytes = await readFile((await file.path())!);
  return { name: file.suggestedFilename(), head: bytes.subarray(0, 5).toString('latin1') };
}

/** The weeks of the archive's timeline, newest first, and which one is shown. */
async function timeline(page: Page): Promise<{ weeks: string[]; current: string | undefined }> {
  const buttons = page.getByRole('list', { name: 'Weekly digests' }).getByRole('button');
  await buttons.first().waitFor();
  const texts = await buttons.allTextContents();
  const current = await buttons.evaluateAll((els) =>
    els.find((e) => e.getAttribute('aria-current') === 'true')?.textContent?.slice(0, 8),
  );
  return { weeks: texts.map((t) => t.slice(0, 8)), current };
}

/**
 * The in-page preview of `title`: the browser got the PDF (200, application/pdf) and Chromium's own PDF
 * viewer shows the document `docTitle` with as many pages as the timeline says.
 */
async function expectPreview(w: Watched, title: string, pdfPath: string, docTitle: string): Promise<void> {
  const { page } = w;
  const preview = page.getByRole('region', { name: `Preview of ${title}` });
  await preview.waitFor();
  const frame = preview.locator('iframe');
  expect(await frame.getAttribute('title')).toBe(`${title} (PDF)`);
  expect(await frame.getAttribute('src')).toBe(`${pdfPath}?disposition=inline`);
  const url = `${server.url}${pdfPath}?disposition=inline`;
  // Chromium's viewer may fetch the document more than once (and may ask for ranges): wait for one whole
  // answer, and require every answer to be a successful PDF, however many there are.
  const answers = () => w.pdfs.filter((r) => r.url === url);
  await expect
    .poll(() => answers().some((r) => r.status === 200 && r.type === 'application/pdf'), { timeout: 15_000 })
    .toBe(true);
  // A repeated fetch the viewer answers from its cache, or cancels, can reach Playwright without headers;
  // what must never happen is an error status or another kind of document.
  for (const answer of answers()) {
    expect([200, 206, 304]).toContain(answer.status);
    if (answer.type !== undefined) expect(answer.type).toBe('application/pdf');
  }
  const current = page.getByRole('list', { name: 'Weekly digests' }).locator('[aria-current="true"]');
  // "8 pages · A4", the entry's second part
  const pages = /^(\d+) pages/.exec((await current.locator('span').nth(1).textContent())!)![1]!;
  const viewerOf = () =>
    page.frames().find((f) => f.url().startsWith('chrome-extension://') && f.parentFrame()?.url() === url);
  await expect.poll(() => viewerOf() !== undefined, { timeout: 15_000 }).toBe(true);
  const viewer = viewerOf()!;
  await viewer.getByText(docTitle, { exact: true }).waitFor();
  await viewer.getByText(`/ ${pages}`, { exact: true }).waitFor();
  // The viewer paints the page itself a moment later: wait until a white page fills part of the frame.
  await expect
    .poll(async () => whiteShare(page, await frame.screenshot()), { timeout: 15_000 })
    .toBeGreaterThan(0.2);
}

/** The share of near-white pixels in a PNG, decoded by the browser itself (no network, no image library). */
function whiteShare(page: Page, png: Buffer): Promise<number> {
  return page.evaluate(async (base64) => {
    const bytes = Uint8Array.from(atob(base64), (c) => c.charCodeAt(0));
    const bitmap = await createImageBitmap(new Blob([bytes], { type: 'image/png' }));
    const canvas = new OffscreenCanvas(bitmap.width, bitmap.height);
    const context = canvas.getContext('2d')!;
    context.drawImage(bitmap, 0, 0);
    const { data } = context.getImageData(0, 0, bitmap.width, bitmap.height);
    let white = 0;
    for (let i = 0; i < data.length; i += 4)
      if (data[i]! > 240 && data[i + 1]! > 240 && data[i + 2]! > 240) white += 1;
    return white / (data.length / 4);
  }, png.toString('base64'));
}

describe('digest screens in the browser', () => {
  it('lets ops make a "Snapshot + digest" schedule, run it now and see the digest step succeed', async () => {
    const w = await signedIn('ops');
    const { page } = w;
    await nav(page, 'Schedules');
    await h1(page, 'Schedules');
    await page.getByRole('button', { name: 'New schedule' }).click();
    const form = page.getByRole('form', { name: 'New schedule' });
    await form.getByLabel('Name').fill(scheduleName);
    await form.getByLabel('Cron expression').fill('0 6 * * 1');
    await form.getByLabel('Time zone').fill('UTC');
    await form.getByLabel('Chosen categories').check();
    await form.getByLabel('Portable Power').check();
    await form.getByLabel('Extra recipients').fill(extraRecipient);
    await form.getByLabel('Produce').selectOption({ label: 'Snapshot + digest' });
    await form.getByRole('button', { name: 'Create schedule' }).click();
    await page.getByText(`Saved "${scheduleName}".`).waitFor();
    const row = page.getByRole('row', { name: new RegExp(scheduleName) });
    await row.getByText('Snapshot + digest').waitFor();

    await row.getByRole('button', { name: `Run ${scheduleName} now` }).click();
    await page.getByText('Queued 1 run.').waitFor();
    await page.getByRole('link', { name: 'Follow them in job history' }).click();
    await h1(page, 'Job history');
    const runRow = page.getByRole('row', { name: new RegExp(scheduleName) });
    await runRow.getByText('Succeeded').waitFor({ timeout: 45_000 });
    await runRow.getByRole('button', { name: /Show run/ }).click();
    const log = page.getByTestId('job-detail').locator('pre');
    await expect.poll(() => log.textContent()).toContain(`snapshot → digest for ${runWeek}`);
    const text = (await log.textContent())!;
    // the manager of Portable Power and the schedule's extra address; then the exec's portfolio digest
    expect(text).toMatch(new RegExp(`Digest of Portable Power for ${runWeek}: \\d+ pages`));
    expect(text).toContain('Queued 2 mails of Portable Power (2 recipients).');
    expect(text).toMatch(new RegExp(`Portfolio digest for ${runWeek}: \\d+ pages`));
    expect(text).toContain('Queued 1 portfolio mail.');

    // An older week rendered by hand, as operations can through the API.
    const produced = await page.evaluate(async (isoWeek) => {
      const csrf = ((await (await fetch('/api/auth/csrf')).json()) as { csrfToken: string }).csrfToken;
      const res = await fetch('/api/digests/produce', {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-csrf-token': csrf },
        body: JSON.stringify({ isoWeek, categories: ['portable-power'] }),
      });
      return { status: res.status, body: (await res.json()) as { digests: unknown[]; queued: number } };
    }, olderWeek);
    expect(produced.status).toBe(200);
    expect(produced.body.digests).toEqual([
      { id: expect.any(Number), kind: 'category', category: 'portable-power' },
      { id: expect.any(Number), kind: 'portfolio', category: null },
    ]);
    expect(produced.body.queued).toBe(2);

    // Every mail leaves through the local SMTP server: five sent, none waiting or failed.
    await nav(page, 'Mail deliveries');
    await h1(page, 'Mail deliveries');
    const counts = page.getByRole('group', { name: 'Filter by status' });
    await expect
      .poll(
        async () => {
          await page.reload();
          return counts.getByRole('button').allTextContents();
        },
        { timeout: 30_000 },
      )
      .toEqual(['All', 'queued (0)', 'sending (0)', 'sent (5)', 'failed (0)']);
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it('shows ops the archive by week, previews the PDF in the page and downloads it by its file name', async () => {
    const w = await signedIn('ops');
    const { page } = w;
    await nav(page, 'Digests');
    await h1(page, 'Digests');
    const choice = page.getByLabel('Digest of');
    await expect
      .poll(() => choice.locator('option').allTextContents())
      .toEqual([
        'Portfolio (every category)',
        'Desk Lighting',
        'Garden Hand Tools',
        'Kettles & Brewers',
        'Portable Power',
        'Trail Packs',
      ]);
    // The portfolio comes first for ops, newest week shown.
    expect(await timeline(page)).toEqual({ weeks: [runWeek, olderWeek], current: runWeek });
    await expectPreview(
      w,
      `Portfolio · ${runWeek}`,
      `/api/portfolio/digests/${runWeek}/pdf`,
      `Ballast portfolio digest, ${runWeek}`,
    );

    await choice.selectOption({ label: 'Portable Power' });
    expect(new URL(page.url()).searchParams.get('category')).toBe('portable-power');
    await expect.poll(() => timeline(page)).toEqual({ weeks: [runWeek, olderWeek], current: runWeek });
    const entries = page.getByRole('list', { name: 'Weekly digests' }).getByRole('button');
    expect(await entries.nth(0).textContent()).toMatch(/\d+ pages · A4Made .* · mail sent 2$/);
    expect(await entries.nth(1).textContent()).toMatch(/\d+ pages · A4Made .* · mail sent 1$/);
    await expectPreview(
      w,
      `Portable Power · ${runWeek}`,
      `/api/categories/portable-power/digests/${runWeek}/pdf`,
      `Ballast digest: Portable Power, ${runWeek}`,
    );
    const link = page.getByRole('link', { name: 'Download PDF' });
    expect(await link.getAttribute('download')).toBe(`ballast-portable-power-${runWeek}.pdf`);
    const latest = await download(page, link);
    expect(latest.name).toBe(`ballast-portable-power-${runWeek}.pdf`);
    expect(latest.head).toBe('%PDF-');
    await shot(page, 'digests-archive.png');

    // Choosing the older week moves the preview and the download to it.
    await entries.nth(1).click();
    await expect.poll(() => timeline(page)).toEqual({ weeks: [runWeek, olderWeek], current: olderWeek });
    await expectPreview(
      w,
      `Portable Power · ${olderWeek}`,
      `/api/categories/portable-power/digests/${olderWeek}/pdf`,
      `Ballast digest: Portable Power, ${olderWeek}`,
    );
    const older = await download(page, link);
    expect(older.name).toBe(`ballast-portable-power-${olderWeek}.pdf`);
    expect(older.head).toBe('%PDF-');

    // A category no schedule covered yet has nothing to show, and says why.
    await choice.selectOption({ label: 'Trail Packs' });
    await page.getByText('No digest yet').waitFor();
    await page.getByText('Digests appear after a schedule that produces “Snapshot + digest”').waitFor();
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it('shows the admin every delivered digest mail in the Outbox, decoded, with its HTML and week link', async () => {
    const w = await signedIn('admin');
    const { page } = w;
    await nav(page, 'Outbox');
    await h1(page, 'Outbox');
    await page.getByText('Choose a message to read it').waitFor();
    const messages = page.getByRole('main').getByRole('listitem').getByRole('button');
    const summaries = (await messages.allTextContents()).map((t) => t.replace(/ · \d+ \w+ \d\d:\d\d$/, ''));
    const manager = account('manager').email;
    const exec = account('exec').email;
    expect(summaries.sort()).toEqual(
      [
        `${ppSubject(runWeek)}to ${manager}`,
        `${ppSubject(runWeek)}to ${extraRecipient}`,
        `${portfolioSubject(runWeek)}to ${exec}`,
        `${ppSubject(olderWeek)}to ${manager}`,
        `${portfolioSubject(olderWeek)}to ${exec}`,
      ].sort(),
    );

    const open = async (subject: string, to: string) => {
      const htmlAnswer = page.waitForResponse((res) => /\/api\/outbox\/\d+\/html$/.test(res.url()));
      await messages
        .filter({ hasText: subject })
        .filter({ hasText: `to ${to}` })
        .click();
      const article = page.getByRole('article');
      await article.getByRole('heading', { level: 2, name: subject, exact: true }).waitFor();
      const html = await htmlAnswer;
      expect(html.status()).toBe(200);
      expect(html.headers()['content-type']).toBe('text/html; charset=utf-8');
      const header = async (name: string) =>
        article
          .locator('dt', { hasText: new RegExp(`^${name}$`) })
          .locator('xpath=following-sibling::dd[1]')
          .textContent();
      return { article, header, mail: page.frameLocator('iframe[title="HTML part"]') };
    };

    const pp = await open(ppSubject(runWeek), manager);
    // As people read it: no MIME encoded-words in the subject anywhere on the screen.
    expect(await pp.header('Subject')).toBe(ppSubject(runWeek));
    expect(await pp.article.textContent()).not.toMatch(/=\?utf-8\?/i);
    expect(await pp.header('To')).toContain(manager);
    const attachment = pp.article.getByRole('link', { name: /^ballast-portable-power-/ });
    expect(await attachment.textContent()).toMatch(
      new RegExp(`^ballast-portable-power-${runWeek}\\.pdf · \\d+ KB$`),
    );
    const attached = await download(page, attachment);
    expect(attached.name).toBe(`ballast-portable-power-${runWeek}.pdf`);
    expect(attached.head).toBe('%PDF-');
    // The HTML part in its sandboxed frame: the week's figures and links back to Ballast.
    const weekLink = pp.mail.getByRole('link', { name: `Open week ${runWeek} in Ballast` });
    expect(await weekLink.getAttribute('href')).toBe(
      `${server.url}/categories/portable-power?week=${runWeek}`,
    );
    await pp.mail.getByText('The week in brief').waitFor();
    await pp.mail.getByText(`ballast-portable-power-${runWeek}.pdf`).waitFor();
    expect(await pp.mail.getByRole('link', { name: /^Stop receiving/ }).getAttribute('href')).toMatch(
      new RegExp(`^${server.url}/unsubscribe\\?token=`),
    );
    await pp.article.getByText('Plain-text part').click();
    expect(await pp.article.locator('pre').textContent()).toContain(
      `${server.url}/categories/portable-power?week=${runWeek}`,
    );
    await shot(page, 'digests-outbox.png');

    const portfolio = await open(portfolioSubject(runWeek), exec);
    expect(await portfolio.header('Subject')).toBe(portfolioSubject(runWeek));
    expect(
      await portfolio.mail.getByRole('link', { name: 'Portable Power', exact: true }).getAttribute('href'),
    ).toBe(`${server.url}/categories/portable-power?week=${runWeek}`);

    // The older week's mail opens that week in the web app, not the latest one.
    const olderMail = await open(ppSubject(olderWeek), manager);
    const href = await olderMail.mail
      .getByRole('link', { name: `Open week ${olderWeek} in Ballast` })
      .getAttribute('href');
    expect(href).toBe(`${server.url}/categories/portable-power?week=${olderWeek}`);
    await page.goto(href!);
    await h1(page, 'Portable Power');
    await expect.poll(() => page.getByLabel('Week', { exact: true }).inputValue()).toBe(olderWeek);
    await page
      .getByRole('table')
      .locator('caption', { hasText: `Portable Power, ${olderWeek},` })
      .waitFor();
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it("opens the week of an older portfolio digest from its mail's link", async () => {
    const w = await signedIn('admin');
    const { page } = w;
    await page.goto(`${server.url}/outbox`);
    await page
      .getByRole('main')
      .getByRole('listitem')
      .getByRole('button')
      .filter({ hasText: portfolioSubject(olderWeek) })
      .click();
    const mail = page.frameLocator('iframe[title="HTML part"]');
    const link = mail.getByRole('link', { name: `Open week ${olderWeek} in Ballast` });
    const href = (await link.getAttribute('href'))!;
    expect(href).toBe(`${server.url}/?week=${olderWeek}`);
    await page.goto(href);
    await h1(page, 'Overview');
    const cards = page.getByRole('list', { name: 'Categories' }).getByRole('listitem');
    await expect.poll(() => cards.count()).toBe(5);
    // The link promises that week; the overview must show it, not the latest week.
    // Wait for the five cards of that week before checking that none shows the latest week.
    await expect.poll(() => cards.filter({ hasText: `${olderWeek} · ` }).count()).toBe(5);
    expect(await page.getByRole('main').textContent()).toContain(olderWeek);
    expect(await cards.filter({ hasText: `${runWeek} · ` }).count()).toBe(0);
    // Opening a category from there stays in that week.
    await cards.first().getByRole('link').click();
    await expect.poll(() => new URL(page.url()).searchParams.get('week')).toBe(olderWeek);
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it('lets the manager turn a digest off and on again on My digests, and the choice survives a reload', async () => {
    const w = await signedIn('manager');
    const { page } = w;
    await nav(page, 'My digests');
    await h1(page, 'My digests');
    const items = page.getByRole('main').getByRole('listitem');
    await expect
      .poll(() => items.locator('p.font-semibold').allTextContents())
      .toEqual(['Kettles & Brewers', 'Portable Power']);
    const power = items.filter({ hasText: 'Portable Power' });
    const box = power.getByRole('checkbox', { name: 'Mail me this digest' });
    expect(await box.isChecked()).toBe(true);
    await power.getByText('Arrives every week after the snapshot. (default)').waitFor();

    // The box follows the saved choice, so it changes once the server has answered.
    await box.click();
    await power.getByText('Not sent to you.', { exact: true }).waitFor();
    await page.reload();
    await power.getByText('Not sent to you.', { exact: true }).waitFor();
    expect(await box.isChecked()).toBe(false);
    // The other category is untouched.
    expect(
      await items
        .filter({ hasText: 'Kettles & Brewers' })
        .getByRole('checkbox', { name: 'Mail me this digest' })
        .isChecked(),
    ).toBe(true);
    await shot(page, 'digests-my-digests.png');

    await box.click();
    await power.getByText('Arrives every week after the snapshot.', { exact: true }).waitFor();
    await page.reload();
    await power.getByText('Arrives every week after the snapshot.', { exact: true }).waitFor();
    expect(await box.isChecked()).toBe(true);
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it('shows the manager only their own categories in the archive and refuses another one on screen', async () => {
    const w = await signedIn('manager');
    const { page } = w;
    await nav(page, 'Digests');
    await h1(page, 'Digests');
    const choice = page.getByLabel('Digest of');
    await expect
      .poll(() => choice.locator('option').allTextContents())
      .toEqual(['Kettles & Brewers', 'Portable Power']);
    await page.getByText('No digest yet').waitFor();
    await choice.selectOption({ label: 'Portable Power' });
    await expect.poll(() => timeline(page)).toEqual({ weeks: [runWeek, olderWeek], current: runWeek });
    await expectPreview(
      w,
      `Portable Power · ${runWeek}`,
      `/api/categories/portable-power/digests/${runWeek}/pdf`,
      `Ballast digest: Portable Power, ${runWeek}`,
    );

    // Desk Lighting is not hers: the browser logs the refused request, and nothing else may go wrong.
    w.allowed.push(/status of 403 .*\/api\/categories\/desk-lighting\/digests$/);
    await page.goto(`${server.url}/digests?category=desk-lighting`);
    await h1(page, 'Digests');
    const refusal = page.getByRole('alert');
    await refusal.getByText('Not available to you.').waitFor();
    expect(await refusal.textContent()).toContain('This category is not one of yours.');
    // Trying again cannot change a refusal, so none is offered.
    expect(await refusal.getByRole('button', { name: 'Try again' }).count()).toBe(0);
    // The picker names the category asked for, not the first of hers.
    expect(await page.getByLabel('Digest of').inputValue()).toBe('desk-lighting');
    expect(await page.getByRole('list', { name: 'Weekly digests' }).count()).toBe(0);
    expect(await page.getByRole('link', { name: 'Download PDF' }).count()).toBe(0);
    await shot(page, 'digests-manager-refused.png');
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });

  it('lets the exec download the portfolio digest', async () => {
    const w = await signedIn('exec');
    const { page } = w;
    await nav(page, 'Digests');
    await h1(page, 'Digests');
    expect(await timeline(page)).toEqual({ weeks: [runWeek, olderWeek], current: runWeek });
    await expectPreview(
      w,
      `Portfolio · ${runWeek}`,
      `/api/portfolio/digests/${runWeek}/pdf`,
      `Ballast portfolio digest, ${runWeek}`,
    );
    const file = await download(page, page.getByRole('link', { name: 'Download PDF' }));
    expect(file.name).toBe(`ballast-portfolio-${runWeek}.pdf`);
    expect(file.head).toBe('%PDF-');

    await nav(page, 'My digests');
    const item = page.getByRole('main').getByRole('listitem');
    await item.getByText('Portfolio digest (every category)').waitFor();
    expect(await item.getByRole('checkbox', { name: 'Mail me this digest' }).isChecked()).toBe(true);
    expect(w.errors, 'console and page errors').toEqual([]);
    await page.context().close();
  });
});
