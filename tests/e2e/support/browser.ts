import { chromium, type Browser, type BrowserContext, type Locator, type Page } from 'playwright-core';
import fs from 'node:fs';
import path from 'node:path';

// Debian's Chromium, driven by playwright-core; the flags keep it quiet and offline.
export const CHROMIUM_FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

export const ARTIFACTS = path.resolve(__dirname, '../../artifacts');

export const VIEWPORTS = {
  phone: { width: 390, height: 844 },
  wide: { width: 1440, height: 900 },
} as const;
export type ViewportName = keyof typeof VIEWPORTS;

export function baseUrl(): string {
  const url = process.env.INFALL_URL;
  if (!url) throw new Error('INFALL_URL is not set: the end-to-end tests need a running stack');
  return url.replace(/\/$/, '');
}

export async function launch(): Promise<Browser> {
  return chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', args: CHROMIUM_FLAGS });
}

export async function newContext(browser: Browser, viewport: ViewportName): Promise<BrowserContext> {
  return browser.newContext({ viewport: VIEWPORTS[viewport], deviceScaleFactor: 1, isMobile: viewport === 'phone', hasTouch: viewport === 'phone' });
}

export async function shot(page: Page, name: string, fullPage = true): Promise<string> {
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  const file = path.join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path: file, fullPage });
  return file;
}

/** Empties a field and types into it one key at a time, as a person would. */
export async function typeInto(page: Page, field: Locator, text: string): Promise<void> {
  await field.click();
  await page.keyboard.press('ControlOrMeta+A');
  await page.keyboard.press('Backspace');
  await field.pressSequentially(text, { delay: 30 });
}

/** Signs in through the local fake provider as one of its invented people, landing on `next`. */
export async function signIn(page: Page, personName: string, next = '/'): Promise<void> {
  await page.goto(`${baseUrl()}/sign-in?next=${encodeURIComponent(next)}`);
  await page.getByTestId('sign-in').click();
  await page.getByRole('button', { name: new RegExp(`^Sign in as ${personName}`) }).click();
  await page.waitForURL((u) => u.pathname === next, { timeout: 20_000 });
}

/**
 * A screenshot of the whole screen content: the app scrolls inside its own view, so the
 * viewport is stretched to the scrolled height for the shot and put back afterwards.
 */
export async function fullShot(page: Page, name: string): Promise<string> {
  const size = page.viewportSize()!;
  const height = await page.evaluate(() => {
    let h = document.documentElement.scrollHeight;
    document.querySelectorAll('div').forEach((el) => {
      if (el.scrollHeight > el.clientHeight + 4 && getComputedStyle(el).overflowY !== 'visible') h = Math.max(h, el.scrollHeight + (window.innerHeight - el.clientHeight));
    });
    return h;
  });
  const total = Math.min(height, 12000);
  await page.setViewportSize({ width: size.width, height: total });
  await page.waitForTimeout(400);
  const file = await shot(page, name, false);
  // Slices of about a screen each, readable at full size.
  const slice = Math.max(size.height, 900);
  for (let k = 0, y = 0; y < total && total > slice; k++, y += slice) {
    await page.screenshot({ path: path.join(ARTIFACTS, `${name}.part${k + 1}.png`), clip: { x: 0, y, width: size.width, height: Math.min(slice, total - y) } });
  }
  await page.setViewportSize(size);
  return file;
}
