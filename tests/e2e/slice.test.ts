import type { Browser, Page } from 'playwright-core';
import { baseUrl, fullShot, launch, newContext, shot, signIn, type ViewportName } from './support/browser';

// The first slice end to end, as a student would do it: sign in through the local provider,
// launch a Plummer sphere as a pair (Newton and emergent gravity), watch both integrate,
// and read the comparison. Once at phone width and once wide, each as a different invented
// student so the two runs of one pair fit their quota of concurrent runs.

jest.setTimeout(300_000);

const CASES: { viewport: ViewportName; student: string }[] = [
  { viewport: 'phone', student: 'Jonas Achterberg' },
  { viewport: 'wide', student: 'Priya Ndlovu' },
];

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

async function fillSpec(page: Page) {
  await page.getByTestId('field-name').fill('E2E Plummer pair (invented)');
  await page.getByTestId('field-model.n').fill('900');
  await page.getByTestId('field-timestep_Myr').fill('0.25');
  await page.getByTestId('field-duration_Myr').fill('150');
  await page.getByTestId('field-snapshotEvery').fill('10');
  await page.getByRole('switch', { name: 'Run as a pair under a second law' }).click();
  await page.getByTestId('law-second').getByRole('radio', { name: 'Emergent' }).click();
}

describe.each(CASES)('at $viewport width', ({ viewport, student }) => {
  let page: Page;
  const errors: string[] = [];

  beforeAll(async () => {
    const ctx = await newContext(browser, viewport);
    page = await ctx.newPage();
    page.on('pageerror', (e) => errors.push(e.message));
  });

  it('signs in through the local provider as a demo student', async () => {
    await page.goto(`${baseUrl()}/`);
    await page.getByTestId('sign-in').waitFor();
    await shot(page, `${viewport}-01-sign-in`);
    await signIn(page, student, '/');
    await page.getByRole('heading', { name: 'Runs', exact: true }).waitFor();
    expect(await page.getByText(`${student} · student`).count()).toBe(1);
    await shot(page, `${viewport}-02-runs`);
  });

  it('fills the new-run form and sees the preview, checks and cost', async () => {
    await page.goto(`${baseUrl()}/runs/new`);
    await page.getByTestId('field-model.n').waitFor();
    await fillSpec(page);
    await page.getByTestId('plot-preview').waitFor();
    const cost = await page.getByTestId('cost-total').textContent();
    expect(cost).toContain('2 runs');
    expect(cost).toContain('N = 900');
    expect(await page.getByText('Would be refused').count()).toBe(0);
    await fullShot(page, `${viewport}-03-new-run`);
  });

  it('launches the pair and watches it progress to the end on the compare page', async () => {
    await page.getByTestId('launch').click();
    await page.waitForURL((u) => u.pathname === '/compare' && u.searchParams.has('pair'), { timeout: 30_000 });
    // Both runs are queued or integrating when the page opens; their progress streams in.
    await page.getByText(/Waiting for a worker|Integrating/).first().waitFor({ timeout: 30_000 });
    await shot(page, `${viewport}-04-compare-live`);
    await page.getByText('How they differ').waitFor({ timeout: 240_000 });
    expect(await page.getByText('Failed').count()).toBe(0);
    await page.getByText('Snapshots in step').waitFor();
    await page.getByTestId('play-toggle').waitFor();
    await fullShot(page, `${viewport}-05-compare`);
    const summary = await page.getByLabel('Summary of differences').textContent();
    expect(summary).toMatch(/Emergent has no potential energy/);
    expect(summary).toMatch(/Half-mass radius changed/);
  });

  it('plays both runs in step', async () => {
    const readout = page.getByTestId('playhead-readout');
    const before = await readout.textContent();
    await page.getByTestId('play-toggle').click();
    await page.waitForTimeout(1500);
    await page.getByTestId('play-toggle').click();
    expect(await readout.textContent()).not.toBe(before);
    const clouds = await page.locator('[data-testid="particle-cloud"]').count();
    expect(clouds).toBe(2);
  });

  it('opens a run of the pair with its diagnostics, snapshots and exports', async () => {
    await page.getByRole('link', { name: /Open E2E Plummer pair \(invented\) · Emergent/ }).click();
    await page.waitForURL((u) => u.pathname.startsWith('/runs/'));
    await page.getByText('Outcome').waitFor();
    await page.getByText('Domain of validity').waitFor();
    await page.getByTestId('plot-momentum').waitFor();
    await page.getByRole('button', { name: 'Diagnostics CSV' }).waitFor();
    await fullShot(page, `${viewport}-06-run`);
    expect(errors).toEqual([]);
  });
});
