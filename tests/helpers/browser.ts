import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { chromium, type Browser } from 'playwright-core';
import { rootDir } from '../../server/config/env';

export const screenshotDir = path.join(rootDir, 'test-results', 'screens');

/** Debian's Chromium, headless, with no background network chatter; playwright gives it a fresh profile. */
export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  mkdirSync(screenshotDir, { recursive: true });
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    browser,
    close: async () => {
      await browser.close();
    },
  };
}
