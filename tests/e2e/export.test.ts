import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, launch, newContext, shot, signIn } from './support/browser';
import { readHdf5 } from '../support/hdf5';

// A researcher saves a finished run's snapshots from the run page in Chromium, and the file
// opens in an HDF5 reader with the frames, velocities and units the README describes.

jest.setTimeout(300_000);

let browser: Browser;
let page: Page;
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'infall-e2e-export-'));

beforeAll(async () => {
  browser = await launch();
  page = await (await newContext(browser, 'wide')).newPage();
});
afterAll(async () => {
  await browser?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

async function aFinishedRun(): Promise<{ id: string; particles: number }> {
  // The demo's runs are integrated by the worker once the stack starts.
  for (const started = Date.now(); Date.now() - started < 240_000; await page.waitForTimeout(2000)) {
    const runs = await page.evaluate(async () => (await (await fetch('/api/runs?status=finished')).json()).runs as { id: string; particles: number }[]);
    if (runs.length) return runs[0];
  }
  throw new Error('no finished run of the demo researcher within 4 minutes');
}

test('the run page saves an HDF5 file that an HDF5 reader opens', async () => {
  await signIn(page, 'Teodora Vance', '/');
  const run = await aFinishedRun();
  await page.goto(`${baseUrl()}/runs/${run.id}`);
  const button = page.getByTestId('download-snapshots');
  await button.scrollIntoViewIfNeeded();
  const [download] = await Promise.all([page.waitForEvent('download'), button.click()]);
  expect(download.suggestedFilename()).toMatch(/^infall-.+-snapshots\.h5$/);
  const file = path.join(dir, download.suggestedFilename());
  await download.saveAs(file);
  await shot(page, 'wide-07-run-export', false);

  const h5 = await readHdf5(file);
  expect(h5.attrs).toMatchObject({ format: 'infall-snapshots', run_id: run.id, velocities_stored: 1, particles_in_run: run.particles });
  const frames = h5.attrs.frames as number;
  const n = h5.attrs.particles_in_file as number;
  expect(h5.datasets['frames/velocity'].shape).toEqual([frames, n, 3]);
  expect(h5.datasets['frames/velocity'].attrs.units).toBe('km/s');
  expect(h5.datasets['frames/position'].attrs.units).toBe('kpc');
  expect(h5.datasets['particles/mass'].attrs.units).toBe('Msun');
  const detail = await page.evaluate(async (id) => (await fetch(`/api/runs/${id}`)).json(), run.id);
  expect(JSON.parse(h5.attrs.spec as string)).toEqual(detail.spec);
});
