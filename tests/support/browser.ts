import fs from 'node:fs';
import path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';

/**
 * Debian's Chromium driven by playwright-core. The flags keep it off the network (this machine
 * has none but loopback). `launch` gives Chromium a fresh temporary profile folder of its own
 * each time and removes it on close (Playwright refuses a --user-data-dir argument here).
 */
export async function launchBrowser(): Promise<{ browser: Browser; close: () => Promise<void> }> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    headless: true,
    args: [
      '--headless',
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

/** Saves a full-page screenshot under test-results/screenshots (git-ignored) for review. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = path.join(process.cwd(), 'test-results', 'screenshots');
  fs.mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
