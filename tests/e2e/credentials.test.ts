import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { APIRequestContext, Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CreatedToken } from '../../shared/schemas/tokens.schema';
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
  // Starting Ballast seeds the demo: room for a machine whose cores are busy with other work.
}, 300_000);

afterAll(async () => {
  await closeBrowser?.();
  await server?.stop();
  const { openDatabase } = await import('../../server/db/sequelize');
  openDatabase(db.url);
  await db.drop();
});

const admin = demoAccounts.find((a) => a.role === 'admin')!;
const colleague = { email: 'ines.keel@example.test', name: 'Ines Keel', password: 'a-colleague-password' };
const tokenName = 'Nightly shelf feed';

/** Signs in through the API of a browser context (cookies are shared with its pages); returns the CSRF token. */
async function apiSignIn(request: APIRequestContext, email: string, password: string): Promise<string> {
  const csrf = ((await (await request.get(`${server.url}/api/auth/csrf`)).json()) as { csrfToken: string })
    .csrfToken;
  const res = await request.post(`${server.url}/api/auth/sign-in`, {
    headers: { 'x-csrf-token': csrf },
    data: { email, password },
  });
  expect(res.status()).toBe(200);
  return ((await res.json()) as { csrfToken: string }).csrfToken;
}

async function signInPage(context: BrowserContext, email: string, password: string): Promise<Page> {
  const page = await context.newPage();
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link').first().waitFor();
  return page;
}

const sample = readFileSync(path.join(rootDir, 'templates/score/score-request.sample.json'), 'utf8');
const callWithToken = (secret: string) =>
  fetch(`${server.url}/api/score`, {
    method: 'POST',
    headers: { authorization: `Bearer ${secret}`, 'content-type': 'application/json' },
    body: sample,
  });

describe('the credential lifecycle on the admin screens', () => {
  it('warns which tokens stop before disabling, hands one over, and ends only the sessions', async () => {
    // Ada adds a second administrator, who signs in in a browser of their own and creates a token.
    const adaContext = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    const adaCsrf = await apiSignIn(adaContext.request, admin.email, admin.password);
    const created = await adaContext.request.post(`${server.url}/api/admin/users`, {
      headers: { 'x-csrf-token': adaCsrf },
      data: { ...colleague, role: 'admin' },
    });
    expect(created.status()).toBe(201);

    const inesContext = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const inesPage = await signInPage(inesContext, colleague.email, colleague.password);
    const inesCsrf = (
      (await (await inesContext.request.get(`${server.url}/api/auth/csrf`)).json()) as {
        csrfToken: string;
      }
    ).csrfToken;
    const tokenRes = await inesContext.request.post(`${server.url}/api/admin/tokens`, {
      headers: { 'x-csrf-token': inesCsrf },
      data: { name: tokenName, role: 'ops' },
    });
    expect(tokenRes.status()).toBe(201);
    const token = (await tokenRes.json()) as CreatedToken;
    expect((await callWithToken(token.secret)).status).toBe(200);

    // Unticking "Active" changes nothing yet (the box stays ticked): the panel names what disabling ends.
    const page = await adaContext.newPage();
    await page.goto(`${server.url}/admin/people`);
    await page.getByRole('heading', { name: 'People', exact: true }).waitFor();
    await page
      .getByRole('row', { name: new RegExp(colleague.name) })
      .getByLabel('Active')
      .click();
    const panel = page.getByRole('region', { name: `Disable ${colleague.name}?` });
    await panel.waitFor();
    await expect.poll(() => panel.textContent()).toContain('signed out on every device');
    const stopping = panel.getByRole('list', { name: `API tokens that stop with ${colleague.name}` });
    await expect
      .poll(() => stopping.getByRole('listitem').allTextContents())
      .toEqual([expect.stringContaining(tokenName)]);
    await page.screenshot({ path: path.join(screenshotDir, 'disable-warning-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 900 });
    await panel.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(screenshotDir, 'disable-warning-390.png'), fullPage: true });
    await page.setViewportSize({ width: 1440, height: 1000 });

    // Hand the token to Ada before confirming, so the script that uses it goes on working.
    await stopping.getByRole('combobox').selectOption({ label: admin.name });
    await panel.getByRole('button', { name: `Hand over “${tokenName}”` }).click();
    await panel
      .getByRole('status')
      .filter({ hasText: `now answers to ${admin.name}` })
      .waitFor();
    await panel.getByText(`${colleague.name} answers for no API token in use`).waitFor();
    await page.screenshot({
      path: path.join(screenshotDir, 'disable-after-hand-over-1440.png'),
      fullPage: true,
    });

    await panel.getByRole('button', { name: `Disable ${colleague.name}` }).click();
    await page.getByText(`${colleague.name} is disabled and signed out on every device.`).waitFor();
    expect(
      await page
        .getByRole('row', { name: new RegExp(colleague.name) })
        .getByLabel('Active')
        .isChecked(),
    ).toBe(false);

    // The handed-over token still works; Ines's session has ended.
    expect((await callWithToken(token.secret)).status).toBe(200);
    expect((await inesContext.request.get(`${server.url}/api/me`)).status()).toBe(401);
    await inesPage.goto(`${server.url}/admin/tokens`);
    await inesPage.getByRole('heading', { name: 'Sign in to Ballast' }).waitFor({ timeout: 90_000 });

    // The tokens page says who answers for each token and offers the same hand-over.
    await page.goto(`${server.url}/admin/tokens`);
    const row = page.getByRole('row', { name: new RegExp(tokenName) });
    await row.getByText(admin.name, { exact: true }).waitFor();
    await page.screenshot({ path: path.join(screenshotDir, 'tokens-answers-to-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 900 });
    await page.screenshot({ path: path.join(screenshotDir, 'tokens-answers-to-390.png'), fullPage: true });
    await inesContext.close();
    await adaContext.close();
  }, 240_000);

  it('says that a new password ends every session of the person before it is set', async () => {
    const context = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
    const analyst = demoAccounts.find((a) => a.role === 'analyst')!;
    const analystContext = await browser.newContext();
    await apiSignIn(analystContext.request, analyst.email, analyst.password);

    const page = await signInPage(context, admin.email, admin.password);
    await page.goto(`${server.url}/admin/people`);
    const row = page.getByRole('row', { name: new RegExp(analyst.name) });
    await row.getByRole('button', { name: 'New password' }).click();
    const form = page.getByRole('form', { name: `New password for ${analyst.name}` });
    await expect.poll(() => form.textContent()).toContain(`signs ${analyst.name} out on every device`);
    await page.screenshot({ path: path.join(screenshotDir, 'password-reset-1440.png'), fullPage: true });
    await page.setViewportSize({ width: 390, height: 900 });
    await form.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(screenshotDir, 'password-reset-390.png'), fullPage: true });

    await form.getByLabel(`New password for ${analyst.name}`).fill('short');
    await form.getByRole('button', { name: /Set password/ }).click();
    await form.getByText('Use at least 12 characters.').waitFor();
    expect((await analystContext.request.get(`${server.url}/api/me`)).status()).toBe(200);

    await form.getByLabel(`New password for ${analyst.name}`).fill('a-brand-new-analyst-password');
    await form.getByRole('button', { name: /Set password/ }).click();
    await page.getByText(`New password set; ${analyst.name} was signed out on every device.`).waitFor();
    expect((await analystContext.request.get(`${server.url}/api/me`)).status()).toBe(401);
    await analystContext.close();
    await context.close();
  }, 180_000);
});
