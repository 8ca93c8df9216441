import fs from 'node:fs';
import path from 'node:path';
import type { Browser } from 'playwright-core';
import { ARTIFACTS, baseUrl, launch, newContext, shot, signIn, type ViewportName } from './support/browser';
import { serveSyntheticRun } from '../bench/client';
import { componentColor } from '../../constants/theme';

// The snapshot animation with 50,000 particles in headless Chromium: the run page is served an
// invented finished run of a disk, bulge and halo (the rest of the app and the session are
// real), playback starts, and for five seconds the page counts requestAnimationFrame callbacks
// and canvas redraws. The figures go to tests/artifacts/animation-fps-VIEWPORT.json; speed is reported
// here, not asserted (it depends on the machine), but the animation must be redrawing, in the
// colours of the model's parts.

jest.setTimeout(180_000);

const PARTICLES = 50_000;
const MEASURE_MS = 5000;

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

interface Measured {
  animationFramesPerSecond: number;
  canvasRedrawsPerSecond: number;
  worstFrameMs: number;
  /** Pixels of the canvas in each part's colour (disk, bulge, halo), on the last frame drawn. */
  pixelsByPart: number[];
}

test.each<ViewportName>(['wide', 'phone'])(`the snapshot animation redraws ${PARTICLES} particles every frame, coloured by part (%s)`, async (viewport) => {
  const ctx = await newContext(browser, viewport);
  const page = await ctx.newPage();
  // Counts the view's redraws: every one ends in putImageData.
  await page.addInitScript(`(() => {
    const put = CanvasRenderingContext2D.prototype.putImageData;
    window.__redraws = 0;
    CanvasRenderingContext2D.prototype.putImageData = function (...args) { window.__redraws++; return put.apply(this, args); };
  })()`);
  const runId = await serveSyntheticRun(page, PARTICLES);
  await signIn(page, 'Teodora Vance');
  await page.goto(`${baseUrl()}/runs/${runId}`);
  await page.getByTestId('particle-cloud').waitFor({ timeout: 60_000 });
  await page.getByTestId('play-toggle').click();

  const paints = ['disk', 'bulge', 'halo'].map((l, k) => componentColor(l, k, 3, '#ffffff'));
  // A string, so no bundler helper leaks into the page.
  const result = (await page.evaluate(`(async () => {
    const canvas = document.querySelector('canvas[data-testid="particle-cloud"]');
    const startRedraws = window.__redraws;
    let frames = 0, worst = 0, last = performance.now();
    const start = last;
    await new Promise((done) => {
      const tick = (now) => {
        frames++; worst = Math.max(worst, now - last); last = now;
        if (now - start < ${MEASURE_MS}) requestAnimationFrame(tick); else done();
      };
      requestAnimationFrame(tick);
    });
    const seconds = (performance.now() - start) / 1000;
    const data = canvas.getContext('2d').getImageData(0, 0, canvas.width, canvas.height).data;
    const paints = ${JSON.stringify(paints)}.map((h) => [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16)));
    const pixelsByPart = paints.map(() => 0);
    for (let i = 0; i < data.length; i += 4) {
      const k = paints.findIndex((p) => p[0] === data[i] && p[1] === data[i + 1] && p[2] === data[i + 2]);
      if (k >= 0) pixelsByPart[k]++;
    }
    return { animationFramesPerSecond: frames / seconds, canvasRedrawsPerSecond: (window.__redraws - startRedraws) / seconds, worstFrameMs: worst, pixelsByPart };
  })()`)) as Measured;

  await shot(page, `animation-${PARTICLES}-${viewport}`, false);
  const record = { particles: PARTICLES, measuredMs: MEASURE_MS, viewport, chromiumFlags: 'headless, --disable-gpu', ...result, measuredAt: new Date().toISOString() };
  fs.mkdirSync(ARTIFACTS, { recursive: true });
  fs.writeFileSync(path.join(ARTIFACTS, `animation-fps-${viewport}.json`), JSON.stringify(record, null, 2));
  console.log(`[animation] ${PARTICLES} particles, ${viewport}: ${result.canvasRedrawsPerSecond.toFixed(1)} redraws/s, ${result.animationFramesPerSecond.toFixed(1)} frames/s, worst frame ${result.worstFrameMs.toFixed(0)} ms, pixels by part ${result.pixelsByPart.join(' / ')}`);

  // Every part shows in its own colour, and the legend names them.
  for (const count of result.pixelsByPart) expect(count).toBeGreaterThan(100);
  expect(await page.getByTestId('particle-legend').textContent()).toBe('disk · 35,000bulge · 5,000halo · 10,000');
  expect(result.canvasRedrawsPerSecond).toBeGreaterThan(0);
  await ctx.close();
});
