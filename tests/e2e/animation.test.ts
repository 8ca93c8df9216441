import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { ARTIFACTS, baseUrl, launch, newContext, shot, signIn } from './support/browser';
import { SYNTHETIC_RUN_ID, syntheticFrames, syntheticRun, syntheticSnapshotBytes } from './support/syntheticRun';

// Measures the snapshot animation with 5,000 particles in headless Chromium: the run page is
// served a synthetic finished run (the rest of the app and the session are real), playback
// starts, and for five seconds the page counts requestAnimationFrame callbacks and, with a
// MutationObserver, how often the particle path was actually redrawn. The figures go to
// tests/artifacts/animation-fps.json; speed is reported here, not asserted (it depends on the
// machine), but the animation must be redrawing.

jest.setTimeout(120_000);

const PARTICLES = 5000;
const MEASURE_MS = 5000;

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

test(`the snapshot animation redraws ${PARTICLES} particles every frame`, async () => {
  const ctx = await newContext(browser, 'wide');
  const page = await ctx.newPage();
  const frames = syntheticFrames(PARTICLES, 60);
  const detail = syntheticRun(PARTICLES, frames);
  const bytes = syntheticSnapshotBytes(frames);
  await page.route(`**/api/runs/${SYNTHETIC_RUN_ID}`, (r) => r.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify(detail) }));
  await page.route(`**/api/runs/${SYNTHETIC_RUN_ID}/snapshots`, (r) => r.fulfill({ status: 200, contentType: 'application/octet-stream', body: bytes }));
  await signIn(page, 'Teodora Vance');
  await page.goto(`${baseUrl()}/runs/${SYNTHETIC_RUN_ID}`);
  await page.getByTestId('play-toggle').waitFor();
  await page.getByTestId('play-toggle').click();

  // A string, so no bundler helper leaks into the page.
  const result = (await page.evaluate(`(async () => {
    const path = document.querySelector('[data-testid="particle-cloud"]');
    const squares = (path.getAttribute('d') || '').split('M').length - 1;
    let redraws = 0;
    const observer = new MutationObserver((ms) => { redraws += ms.filter((m) => m.attributeName === 'd').length; });
    observer.observe(path, { attributes: true });
    let frames = 0, worst = 0, last = performance.now();
    const start = last;
    await new Promise((done) => {
      const tick = (now) => {
        frames++; worst = Math.max(worst, now - last); last = now;
        if (now - start < ${MEASURE_MS}) requestAnimationFrame(tick); else done();
      };
      requestAnimationFrame(tick);
    });
    observer.disconnect();
    const seconds = (performance.now() - start) / 1000;
    return { animationFramesPerSecond: frames / seconds, particlePathRedrawsPerSecond: redraws / seconds, worstFrameMs: worst, squaresDrawn: squares };
  })()`)) as { animationFramesPerSecond: number; particlePathRedrawsPerSecond: number; worstFrameMs: number; squaresDrawn: number };

  await shot(page, 'animation-5000', false);
  const record = { particles: PARTICLES, measuredMs: MEASURE_MS, viewport: '1440x900', chromiumFlags: 'headless, --disable-gpu', ...result, measuredAt: new Date().toISOString() };
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  fs.writeFileSync(path.join(ARTIFACTS, 'animation-fps.json'), JSON.stringify(record, null, 2));
  console.log(`[animation] ${PARTICLES} particles: ${result.particlePathRedrawsPerSecond.toFixed(1)} redraws/s, ${result.animationFramesPerSecond.toFixed(1)} frames/s, worst frame ${result.worstFrameMs.toFixed(0)} ms`);

  expect(result.squaresDrawn).toBeGreaterThan(1000);
  expect(result.particlePathRedrawsPerSecond).toBeGreaterThan(0);
  await ctx.close();
});
