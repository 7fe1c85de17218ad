import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDatabase } from '../../server/db/sequelize';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { launchBrowser, screenshotDir } from '../helpers/browser';
import { loadDemoForTests } from '../helpers/demo-data';
import { startServerProcess, type ServerProcess } from '../helpers/server-process';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let db: TestDatabase;
let server: ServerProcess;
let browser: Browser;
let closeBrowser: () => Promise<void>;

beforeAll(async () => {
  db = await createTestDatabase();
  await seedDemo(() => {});
  await loadDemoForTests();
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

async function signInAsOps(page: Page): Promise<void> {
  const ops = demoAccounts.find((a) => a.role === 'ops')!;
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel('E-mail').fill(ops.email);
  await page.getByLabel('Password').fill(ops.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Schedules' }).waitFor();
}

describe('schedules and job history in the browser', () => {
  it('lets ops create a schedule, read when it runs, run it now and see the run succeed', async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, timezoneId: 'UTC' });
    const page = await context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (msg) => {
      if (msg.type() === 'error') consoleErrors.push(msg.text());
    });
    await signInAsOps(page);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Schedules' }).click();
    await page.getByRole('heading', { name: 'Schedules', level: 1 }).waitFor();
    // Ballast starts with one schedule of its own: the daily alert check.
    await page.getByRole('row', { name: /Daily alert check/ }).waitFor();
    await page.getByRole('button', { name: 'New schedule' }).click();

    const form = page.getByRole('form', { name: 'New schedule' });
    await form.getByLabel('Name').fill('Desk lighting, Monday mornings');
    await form.getByLabel('Cron expression').fill('61 6 * * 1');
    await expect
      .poll(() => form.getByRole('alert').first().textContent())
      .toBe('The minute field allows 0–59; "61" is outside that range.');
    await form.getByLabel('Cron expression').fill('30 6 * * 1');
    await form.getByLabel('Time zone').fill('Europe/London');
    await expect.poll(() => form.getByTestId('cron-words').textContent()).toBe('At 06:30, only on Monday');
    const runs = form.getByRole('list', { name: 'Next five runs' }).getByRole('listitem');
    await expect.poll(() => runs.count()).toBe(5);
    const times = await runs.locator('time').evaluateAll((els) => els.map((e) => e.getAttribute('datetime')));
    for (const iso of times) expect(iso).toMatch(/T06:30:00\+0[01]:00$/);
    expect(new Date(times[0]!).getUTCDay()).toBe(1);

    await form.getByLabel('Chosen categories').check();
    await form.getByLabel('Desk Lighting').check();
    await form.getByLabel('Extra recipients').fill('lighting-team@example.com');
    await form.getByLabel('Produce').selectOption('snapshot');
    await page.screenshot({ path: path.join(screenshotDir, 'schedules.png'), fullPage: true });
    await form.getByRole('button', { name: 'Create schedule' }).click();
    await page.getByText('Saved "Desk lighting, Monday mornings".').waitFor();

    const row = page.getByRole('row', { name: /Desk lighting, Monday mornings/ });
    await row.getByText('At 06:30, only on Monday').waitFor();
    expect(
      await row
        .getByRole('switch', { name: 'Desk lighting, Monday mornings enabled' })
        .getAttribute('aria-checked'),
    ).toBe('true');
    await page.screenshot({ path: path.join(screenshotDir, 'schedules-list.png'), fullPage: true });

    await row.getByRole('button', { name: 'Run Desk lighting, Monday mornings now' }).click();
    await page.getByText('Queued 1 run.').waitFor();
    await page.getByRole('link', { name: 'Follow them in job history' }).click();
    await page.getByRole('heading', { name: 'Job history', level: 1 }).waitFor();
    const runRow = page.getByRole('row', { name: /Desk lighting, Monday mornings/ });
    await runRow.getByText('Succeeded').waitFor({ timeout: 45_000 });
    expect(await runRow.getByRole('cell').nth(3).textContent()).toBe('Desk Lighting');

    await runRow.getByRole('button', { name: /Show run/ }).click();
    const detail = page.getByTestId('job-detail');
    await detail.getByText('Run by hand').waitFor();
    await expect
      .poll(() => detail.locator('pre').textContent())
      .toMatch(/snapshot \d+ of \d{4}-W\d{2}: \d+ rows\./);

    await page.getByLabel('Status').selectOption('failed');
    await page.getByText('No runs match these filters').waitFor();
    expect(new URL(page.url()).searchParams.get('status')).toBe('failed');
    await page.getByLabel('Status').selectOption('succeeded');
    await runRow.waitFor();
    await page.screenshot({ path: path.join(screenshotDir, 'jobs.png'), fullPage: true });
    expect(consoleErrors, 'no console errors').toEqual([]);
    await context.close();
  });

  it('lets ops backfill past weeks of a category from the job history and follow the run', async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, timezoneId: 'UTC' });
    const page = await context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (msg) => {
      if (msg.type() === 'error') consoleErrors.push(msg.text());
    });
    await signInAsOps(page);
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Job history' }).click();
    await page.getByRole('button', { name: 'Backfill past weeks' }).click();
    const form = page.getByRole('form', { name: 'Backfill past weeks' });
    await form.getByLabel('Category').selectOption({ label: 'Trail Packs' });
    await form.getByLabel('From week').fill('2026-W54');
    await form.getByRole('button', { name: 'Queue backfill' }).click();
    await form.getByText('Use an ISO week such as 2026-W48').waitFor();
    await form.getByLabel('From week').fill('2026-W40');
    await form.getByLabel('To week').fill('2026-W41');
    await form.getByRole('button', { name: 'Queue backfill' }).click();
    await form.getByRole('status').getByText('Queued 1 run').waitFor();

    const runRow = page.getByRole('row').filter({ hasText: 'Backfill' }).filter({ hasText: 'Trail Packs' });
    await runRow.getByText('Succeeded').waitFor({ timeout: 45_000 });
    const detail = page.getByTestId('job-detail');
    await expect
      .poll(() => detail.locator('pre').textContent(), { timeout: 15_000 })
      .toContain('Backfill wrote 2 weekly snapshots.');
    await page.screenshot({ path: path.join(screenshotDir, 'jobs-backfill.png'), fullPage: true });
    expect(consoleErrors, 'no console errors').toEqual([]);
    await context.close();
  });

  it('stops the scheduler first on SIGTERM, then the server', async () => {
    await server.stop();
    const out = server.output();
    expect(out).toMatch(/Scheduler running with \d+ enabled schedule\(s\)\./);
    expect(out.indexOf('Scheduler stopped.')).toBeGreaterThan(out.indexOf('SIGTERM received'));
    expect(out.indexOf('Stopped.', out.indexOf('Scheduler stopped.') + 18)).toBeGreaterThan(0);
  });
});
