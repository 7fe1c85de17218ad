import path from 'node:path';
import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../server/config/env';
import { closeDatabase } from '../../server/db/sequelize';
import { demoAccounts } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let db: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  db = await createTestDatabase();
  await closeDatabase();
  server = await startServerProcess(db.url);
  ({ browser, close: closeBrowser } = await launchBrowser());
});

afterAll(async () => {
  await closeBrowser?.();
  await server?.stop();
  const { openDatabase } = await import('../../server/db/sequelize');
  openDatabase(db.url);
  await db.drop();
});

describe('importing a file through the browser', () => {
  it('previews the file with mistakes, imports the valid rows and shows 6 accepted and 7 rejected', async () => {
    const ops = demoAccounts.find((a) => a.role === 'ops')!;
    const context = await browser.newContext({ viewport: { width: 1440, height: 900 } });
    const page = await context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (msg) => {
      if (msg.type() === 'error') consoleErrors.push(msg.text());
    });
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(ops.email);
    await page.getByLabel('Password').fill(ops.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Imports' }).click();
    await page.getByRole('heading', { name: 'Imports', level: 1 }).waitFor();

    await page
      .getByLabel('Choose a CSV file to import')
      .setInputFiles(path.join(rootDir, 'templates', 'imports', 'reviews.with-mistakes.sample.csv'));
    await expect
      .poll(() => page.getByTestId('preview-summary').textContent())
      .toContain('6 readable, 7 with mistakes');
    const table = page.getByRole('table', { name: 'Preview of the first rows of the file' });
    await expect.poll(() => table.getByRole('row').count()).toBe(14);
    expect(await table.getByText('stars must be a whole number from 1 to 5 (got "6")').count()).toBe(1);
    // The bad rows show what they held, as text.
    await expect.poll(() => table.getByTestId('preview-raw').count()).toBe(7);
    expect(await table.getByTestId('preview-raw').first().textContent()).toContain(',6,');

    await page.getByRole('radio', { name: /Import the valid rows/ }).check();
    await page.getByRole('button', { name: 'Import reviews.with-mistakes.sample.csv' }).click();
    await expect
      .poll(() => page.getByTestId('import-outcome').textContent(), { timeout: 20_000 })
      .toBe('Done: 6 rows of 13 imported (6 new); 7 rows rejected.');
    expect(await page.getByTestId('result-accepted').textContent()).toBe('6');
    expect(await page.getByTestId('result-rejected').textContent()).toBe('7');
    expect(await page.getByTestId('result-not-written').textContent()).toBe('0');
    expect(await page.getByTestId('result-unchanged').textContent()).toBe('0');
    await page.getByRole('link', { name: 'Download the 7 rejected rows (CSV)' }).waitFor();
    const history = page.getByRole('table', { name: 'Import history, newest first' });
    await history.getByText('reviews.with-mistakes.sample.csv').waitFor();

    await page.screenshot({ path: path.join(screenshotDir, 'imports.png'), fullPage: true });

    // A file whose every row is wrong: nothing was imported, and the screen says so.
    const header =
      'review_id,sku,title,category,stars,reviewed_at,helpful_yes,helpful_no,reviewer_id,reviewer_score,verified,text';
    const bad = [1, 2, 3].map(
      (i) => `zz-${i},KB-101,Kettle,kettles-and-brewers,${5 + i},2026-05-01,0,0,,,,<b>bold</b>`,
    );
    await page.getByLabel('Choose a CSV file to import').setInputFiles({
      name: 'all-wrong.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from([header, ...bad].join('\n') + '\n'),
    });
    await expect.poll(() => page.getByTestId('preview-summary').textContent()).toContain('3 with mistakes');
    // Markup in a bad row is shown as the characters it is, never run.
    expect(await page.getByTestId('preview-raw').first().textContent()).toContain('<b>bold</b>');
    await page.getByRole('radio', { name: /Import the valid rows/ }).check();
    await page.getByRole('button', { name: 'Import all-wrong.csv' }).click();
    await expect
      .poll(() => page.getByTestId('import-outcome').textContent(), { timeout: 20_000 })
      .toBe('Nothing was imported: all 3 rows read have mistakes.');
    expect(await page.getByTestId('import-status-badge').first().textContent()).toBe('Nothing imported');
    await page.screenshot({ path: path.join(screenshotDir, 'imports-nothing-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 844 });
    await page.screenshot({ path: path.join(screenshotDir, 'imports-nothing-390.png'), fullPage: true });
    // No page-level sideways scroll: the tables scroll inside their own frames.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    expect(consoleErrors, 'no console errors').toEqual([]);
    await context.close();
  });

  it('lets an admin create a token, see its secret once and revoke it', async () => {
    const admin = demoAccounts.find((a) => a.role === 'admin')!;
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const page = await context.newPage();
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel('E-mail').fill(admin.email);
    await page.getByLabel('Password').fill(admin.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'API tokens' }).click();
    await page.getByLabel('Name').fill('Weekly warehouse feed');
    await page.getByRole('button', { name: 'Create token' }).click();
    const secret = await page.getByLabel('Token secret').textContent();
    expect(secret).toMatch(/^blst_/);
    await page.screenshot({ path: path.join(screenshotDir, 'tokens.png'), fullPage: true });
    await page.getByRole('button', { name: 'I have stored it' }).click();
    page.once('dialog', (dialog) => void dialog.accept());
    await page.getByRole('button', { name: 'Revoke Weekly warehouse feed' }).click();
    await page.getByText(/^Revoked /).waitFor();
    expect(await page.getByText(secret!).count()).toBe(0);
    await context.close();
  });
});
