import type { Browser, Page } from 'playwright-core';
import { baseUrl, launch, newContext, shot, signIn } from './support/browser';

// The web export under the server's content security policy: every screen a student passes
// through loads and runs with no policy violation, and no other page may frame the app.

jest.setTimeout(180_000);

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

test('the app loads, signs in, launches and shows a run with no content-security-policy violation', async () => {
  const ctx = await newContext(browser, 'wide');
  const page: Page = await ctx.newPage();
  const violations: string[] = [];
  const errors: string[] = [];
  page.on('console', (m) => /Content Security Policy|Refused to/i.test(m.text()) && violations.push(m.text()));
  page.on('pageerror', (e) => errors.push(e.message));
  await page.exposeFunction('reportViolation', (v: string) => violations.push(v));
  await page.addInitScript(() => {
    document.addEventListener('securitypolicyviolation', (e) => (window as unknown as { reportViolation(v: string): void }).reportViolation(`${e.violatedDirective} ${e.blockedURI}`));
  });

  const first = await page.goto(`${baseUrl()}/`);
  const csp = first!.headers()['content-security-policy'];
  expect(csp).toMatch(/frame-ancestors 'none'/);
  expect(first!.headers()['x-content-type-options']).toBe('nosniff');
  await page.getByTestId('sign-in').waitFor();
  await signIn(page, 'Jonas Achterberg', '/');
  await page.getByRole('heading', { name: 'Runs', exact: true }).waitFor();

  // A small run through the API from the page itself (same origin, the session's CSRF token).
  const id = await page.evaluate(async () => {
    const me = await (await fetch('/api/auth/me')).json();
    const res = await fetch('/api/runs', {
      method: 'POST',
      headers: { 'Content-Type': 'application/json', 'X-CSRF-Token': me.csrfToken },
      body: JSON.stringify({
        name: 'CSP check (invented)',
        spec: { version: 1, model: { kind: 'plummer', n: 100, mass_Msun: 1e10, scale_kpc: 1 }, law: { kind: 'newton' }, timestep_Myr: 0.5, duration_Myr: 20, softening_kpc: 0.05, snapshotEvery: 4 },
      }),
    });
    return (await res.json()).runs[0].id as string;
  });
  await page.goto(`${baseUrl()}/runs/${id}`);
  await page.getByText('Done', { exact: true }).first().waitFor({ timeout: 60_000 });
  await page.waitForTimeout(1000);
  await shot(page, 'csp-run-view');
  await page.goto(`${baseUrl()}/runs/new`);
  await page.waitForTimeout(1500);
  await shot(page, 'csp-launch');

  expect(violations).toEqual([]);
  expect(errors).toEqual([]);
  await ctx.close();
});

test('a page of another origin cannot frame the app', async () => {
  const ctx = await newContext(browser, 'wide');
  const page = await ctx.newPage();
  const blocked: string[] = [];
  page.on('console', (m) => /frame-ancestors|Refused to frame/i.test(m.text()) && blocked.push(m.text()));
  await page.setContent(`<iframe id="f" src="${baseUrl()}/"></iframe>`);
  await page.waitForTimeout(2000);
  const inner = page.frames().find((f) => f.url().startsWith(baseUrl()));
  const framedText = inner ? await inner.evaluate(() => document.body?.innerText ?? '').catch(() => '') : '';
  expect(framedText).not.toMatch(/Infall|Sign in/);
  expect(blocked.length).toBeGreaterThan(0);
  await ctx.close();
});
