import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import { baseUrl, fullShot, launch, newContext, signIn } from './support/browser';

// A researcher on a phone imports a rotation-curve table through the file picker, maps its
// columns, sees the preview, uploads it, and lands on the galaxy's page with its plot.

jest.setTimeout(180_000);

let browser: Browser;
let page: Page;
const errors: string[] = [];
let table: string;

beforeAll(async () => {
  browser = await launch();
  const ctx = await newContext(browser, 'phone');
  page = await ctx.newPage();
  page.on('pageerror', (e) => errors.push(e.message));
  // Columns in an unusual order and a header the parser cannot guess: the person maps them.
  table = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'infall-galaxy-')), 'heron-invented.txt');
  const rows = Array.from({ length: 14 }, (_, i) => {
    const R = 0.7 * (i + 1);
    const v = 120 * (1 - Math.exp(-R / 2));
    return `${(0.03 * v + 3).toFixed(2)}  ${R.toFixed(2)}  ${v.toFixed(2)}  ${(0.6 * v).toFixed(2)}`;
  });
  fs.writeFileSync(table, ['# Heron: an invented curve', 'sig  rad  vel  star', ...rows, ''].join('\n'));
});
afterAll(async () => {
  await browser?.close();
});

describe('importing a rotation curve on a phone', () => {
  it('picks a file, maps its columns, previews it, uploads it and shows the galaxy’s plot', async () => {
    await signIn(page, 'Teodora Vance', '/galaxies');
    await page.getByTestId('galaxy-import').click();
    await page.waitForURL((u) => u.pathname === '/galaxies/import');

    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('galaxy-pick').click();
    await (await chooser).setFiles(table);
    await page.getByTestId('galaxy-file').waitFor();
    // No header name says which column is which: the preview refuses until they are mapped.
    await page.getByTestId('galaxy-table-error').waitFor();

    const map = async (group: string, column: string) => page.getByRole('radiogroup', { name: group }).getByRole('radio', { name: column }).click();
    await map('Radius', 'rad');
    await map('Observed speed', 'vel');
    await map('Speed error (1σ)', 'sig');
    await map('Stellar disk speed at M/L = 1 (optional)', 'star');
    await page.getByTestId('galaxy-preview-summary').waitFor();
    expect(await page.getByTestId('galaxy-preview-summary').textContent()).toMatch(/^14 points from 0\.7 to 9\.8 kpc; components: stellar disk\./);

    const name = page.getByTestId('galaxy-name');
    await name.click();
    await page.keyboard.press('ControlOrMeta+A');
    await page.keyboard.press('Backspace');
    await name.pressSequentially('Heron (invented)', { delay: 20 });
    await page.getByTestId('galaxy-upload').click();

    await page.waitForURL((u) => /^\/galaxies\/\d+$/.test(u.pathname), { timeout: 20_000 });
    const id = new URL(page.url()).pathname.split('/').pop();
    await page.getByRole('heading', { name: 'Heron (invented)' }).waitFor();
    await page.getByTestId('galaxy-curve').waitFor();
    await page.getByTestId('galaxy-rar').waitFor();
    // The data as points with error bars: one path of bars, one of marks, and the legend's swatch.
    await page.getByRole('button', { name: 'observed, points with round marks with error bars' }).waitFor();
    const before = await page.getByTestId('galaxy-curve').locator('path').count();

    // What the server stored is the file as picked, byte for byte.
    const raw = await page.evaluate(async (gid) => (await fetch(`/api/galaxies/${gid}/file`)).text(), id);
    expect(raw).toBe(fs.readFileSync(table, 'utf8'));

    await page.getByTestId('fit-run').click();
    await page.getByTestId('fit-table').waitFor({ timeout: 60_000 });
    await page.getByTestId('legend-fit-total').waitFor();
    // The fitted curve and its parts join the data.
    expect(await page.getByTestId('galaxy-curve').locator('path').count()).toBeGreaterThan(before + 3);
    await fullShot(page, 'galaxy-phone');
    expect(errors).toEqual([]);
  });

  it('lists the galaxy for its owner, and shows the acceleration relation of a selection', async () => {
    await page.goto(`${baseUrl()}/galaxies`);
    const card = page.getByRole('checkbox', { name: /Add Heron \(invented\)/ }).first();
    await card.click();
    await page.getByTestId('selection-rar').waitFor();
    await fullShot(page, 'galaxies-phone');
    expect(errors).toEqual([]);
  });

  it('takes the particles of a new run from a file, refusing a bad one with its line and column', async () => {
    const dir = path.dirname(table);
    fs.writeFileSync(path.join(dir, 'pair-invented.csv'), 'x,y,z,vx,vy,vz,mass\n1,0,0,0,50,0,1e9\n-1,0,0,0,-50,0,1e9\n-2,0,0,0,-30,0,1e8\n');
    fs.writeFileSync(path.join(dir, 'hostile.csv'), '1,0,0,0,50,0,1e9\n1,0,0,0,50,0,=2+2\n');
    await page.goto(`${baseUrl()}/runs/new`);
    await page.getByRole('radio', { name: 'Uploaded particles' }).click();
    const pick = async (file: string) => {
      const chooser = page.waitForEvent('filechooser');
      await page.getByTestId('field-model.particles').click();
      await (await chooser).setFiles(path.join(dir, file));
    };
    await pick('pair-invented.csv');
    await page.getByText('3 particles read from pair-invented.csv').waitFor();
    await pick('hostile.csv');
    await page.getByText(/^file: line 2, column 7: .*formula/).waitFor();
    expect(errors).toEqual([]);
  });
});
