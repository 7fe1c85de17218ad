import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roleLabels } from '../../shared/auth';
import { navFor } from '../../src/app/navigation';
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

async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

describe('signing in through the browser', () => {
  for (const account of demoAccounts) {
    it(`shows the ${account.role} their own navigation`, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
      const page = await context.newPage();
      const consoleErrors: string[] = [];
      page.on('console', (msg) => {
        if (msg.type() === 'error') consoleErrors.push(msg.text());
      });
      await signIn(page, account.email, account.password);
      const nav = page.getByRole('navigation', { name: 'Main' });
      await nav.getByRole('link').first().waitFor();
      const labels = await nav.getByRole('link').allTextContents();
      expect(labels).toEqual(navFor(account.role).map((item) => item.label));
      await expect.poll(() => page.getByTestId('role-label').textContent()).toBe(roleLabels[account.role]);
      await page.getByRole('heading', { level: 1 }).waitFor();
      await page.screenshot({ path: path.join(screenshotDir, `home-${account.role}.png`), fullPage: true });
      expect(consoleErrors, 'no console errors (CSP included)').toEqual([]);

      await page.getByRole('button', { name: 'Sign out' }).click();
      await page.getByRole('heading', { name: 'Sign in to Ballast' }).waitFor();
      await context.close();
    });
  }

  it('says clearly when the password is wrong', async () => {
    const page = await browser.newPage();
    await signIn(page, demoAccounts[0]!.email, 'not-the-password');
    await expect
      .poll(() => page.getByRole('alert').textContent())
      .toBe('That e-mail and password do not match an account.');
    await page.screenshot({ path: path.join(screenshotDir, 'sign-in-error.png') });
    await page.close();
  });

  it('sends a visitor without a session to sign-in and back to the page they asked for', async () => {
    const analyst = demoAccounts.find((a) => a.role === 'analyst')!;
    const page = await browser.newPage();
    await page.goto(`${server.url}/categories/desk-lighting`);
    await page.getByRole('heading', { name: 'Sign in to Ballast' }).waitFor();
    expect(new URL(page.url()).searchParams.get('next')).toBe('/categories/desk-lighting');
    await page.getByLabel('E-mail').fill(analyst.email);
    await page.getByLabel('Password').fill(analyst.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Desk Lighting' }).waitFor();
    await page.close();
  });

  it('says "Your session has ended" only when a session did end, never on a first visit', async () => {
    const analyst = demoAccounts.find((a) => a.role === 'analyst')!;
    const ended = 'Your session has ended. Please sign in again.';
    for (const width of [1440, 390]) {
      const context = await browser.newContext({ viewport: { width, height: 900 } });
      const page = await context.newPage();
      await page.goto(`${server.url}/categories/desk-lighting`);
      await page.getByRole('heading', { name: 'Sign in to Ballast' }).waitFor();
      await page.waitForLoadState('networkidle');
      expect(new URL(page.url()).searchParams.get('ended')).toBeNull();
      expect(await page.getByText(ended).count()).toBe(0);
      await page.screenshot({ path: path.join(screenshotDir, `sign-in-first-visit-${width}.png`) });

      await page.getByLabel('E-mail').fill(analyst.email);
      await page.getByLabel('Password').fill(analyst.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.getByRole('heading', { name: 'Desk Lighting' }).waitFor();
      await context.clearCookies();
      await page.goto(`${server.url}/categories/desk-lighting`);
      // Generous bounds: on a loaded CI machine the redirect after the 401 can be slow; the condition is fixed.
      await page.waitForURL(/[?&]ended=1/, { timeout: 90_000 });
      await page.getByText(ended).waitFor({ timeout: 90_000 });
      await page.screenshot({ path: path.join(screenshotDir, `sign-in-session-ended-${width}.png`) });
      await context.close();
    }
  }, 300_000);

  it('shows a 404 page for an unknown address, and a clear refusal for a category that is not yours', async () => {
    const manager = demoAccounts.find((a) => a.role === 'manager')!;
    const page = await browser.newPage();
    await signIn(page, manager.email, manager.password);
    await page.getByRole('heading', { name: 'My categories' }).waitFor();
    await page.goto(`${server.url}/no/such/page`);
    await page.getByRole('heading', { name: 'There is no such page in Ballast' }).waitFor();
    await page.goto(`${server.url}/categories/desk-lighting`);
    await page.getByRole('heading', { name: 'Not available to you' }).waitFor();
    expect(await page.getByText('This category is not one of yours.').count()).toBe(1);
    await page.screenshot({ path: path.join(screenshotDir, 'category-forbidden.png') });
    await page.close();
  });
});
