import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Browser } from 'playwright-core';
import { launchBrowser, screenshot } from '../support/browser';
import { appUrl } from '../support/env';

describe('home page in Chromium', () => {
  let browser: Browser;
  let close: () => Promise<void>;

  beforeAll(async () => {
    ({ browser, close } = await launchBrowser());
  });
  afterAll(async () => {
    await close();
  });

  it('renders the product heading and reports all three services up', async () => {
    const page = await browser.newPage();
    const res = await page.goto(appUrl());
    expect(res?.status()).toBe(200);
    await expect(page.getByRole('heading', { level: 1 }).textContent()).resolves.toBe('Varigate');
    const items = page.getByTestId('service-list').locator('li');
    await expect(items.count()).resolves.toBe(3);
    const texts = await items.allTextContents();
    expect(texts.map((t) => t.replace(/\s+/g, ' '))).toEqual(['databaseup', 'storageup', 'mailup']);
    await screenshot(page, 'home');
    await page.close();
  });

  it('loads the shipped font from this origin, never from a font service', async () => {
    const page = await browser.newPage();
    const fontRequests: string[] = [];
    page.on('request', (req) => {
      if (req.resourceType() === 'font') fontRequests.push(req.url());
    });
    await page.goto(appUrl());
    await page.evaluate(() => document.fonts.ready);
    expect(fontRequests.length).toBeGreaterThan(0);
    for (const url of fontRequests) expect(new URL(url).origin).toBe(new URL(appUrl()).origin);
    await page.close();
  });
});
