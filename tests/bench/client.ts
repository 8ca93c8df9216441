// The client's animation in headless Chromium: frames per second while a
// finished run's snapshots play on the real run page, counted as requestAnimationFrame
// callbacks. The run is invented (tests/e2e/support/syntheticRun.ts) and served in place of
// the API's answers, so its size is not bounded by what the bench user may compute.
import { chromium, type Browser, type Page } from 'playwright-core';
import { CHROMIUM_FLAGS } from '../e2e/support/browser';
import { SYNTHETIC_RUN_ID, syntheticRun, syntheticSnapshotBytes, syntheticSnapshots } from '../e2e/support/syntheticRun';

export interface ClientFigures {
  particles: number;
  seconds: number;
  fps: number;
}

export interface SignedInBrowser {
  browser: Browser;
  page: Page;
  close(): Promise<void>;
}

/** Opens Chromium and signs in through the fake provider's page with an invented login (it creates the user). */
export async function signInBrowser(url: string, login: string): Promise<SignedInBrowser> {
  const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', args: CHROMIUM_FLAGS });
  const page = await browser.newPage({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
  await page.goto(`${url}/sign-in?next=/`);
  await page.getByTestId('sign-in').click();
  await page.locator('#other').fill(login);
  await page.getByRole('button', { name: 'Sign in with the login typed above' }).click();
  await page.waitForURL((u) => u.origin === url && u.pathname === '/', { timeout: 30_000 });
  return { browser, page, close: () => browser.close() };
}

/** Serves an invented finished run of `particles` particles to this page (the rest of the app and the session stay real). */
export async function serveSyntheticRun(page: Page, particles: number, frames = 60): Promise<string> {
  const set = syntheticSnapshots(particles, frames);
  const detail = JSON.stringify(syntheticRun(particles, set.frames));
  const bytes = syntheticSnapshotBytes(set);
  await page.route((u) => u.pathname === `/api/runs/${SYNTHETIC_RUN_ID}`, (r) => r.fulfill({ status: 200, contentType: 'application/json', body: detail }));
  await page.route((u) => u.pathname === `/api/runs/${SYNTHETIC_RUN_ID}/snapshots`, (r) => r.fulfill({ status: 200, contentType: 'application/octet-stream', body: bytes }));
  return SYNTHETIC_RUN_ID;
}

/** Opens the run page of an invented run, starts playback and counts animation frames for `seconds`. */
export async function benchClient(page: Page, url: string, particles: number, seconds = 4): Promise<ClientFigures> {
  const runId = await serveSyntheticRun(page, particles);
  await page.goto(`${url}/runs/${runId}`);
  const play = page.getByTestId('play-toggle');
  await page.getByTestId('particle-cloud').waitFor({ timeout: 60_000 });
  await play.click();
  const readout = page.getByTestId('playhead-readout');
  const before = await readout.textContent();
  // Passed as source text: the bench runs through a TypeScript loader whose helpers don't exist in the page.
  const fps = await page.evaluate<number>(`new Promise((resolve) => {
    let frames = 0;
    const first = performance.now();
    const tick = (now) => {
      frames++;
      if (now - first < ${seconds * 1000}) requestAnimationFrame(tick);
      else resolve((1000 * frames) / (now - first));
    };
    requestAnimationFrame(tick);
  })`);
  // A readout that did not move would mean the frames were counted over a still picture.
  if ((await readout.textContent()) === before) throw new Error('the playhead did not move during the measurement');
  return { particles, seconds, fps };
}
