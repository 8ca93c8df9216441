import type { Browser, BrowserContext, ConsoleMessage, Page } from 'playwright-core';
import { baseUrl, launch, newContext, shot, signIn } from './support/browser';

// Links land: an invitation mail's link joins the cohort for someone signed out, a deep
// link opened signed out comes back after sign-in, every seeded run can be cloned into the
// new-run form, and signed-out page loads log nothing on the console.

jest.setTimeout(240_000);

const OUTBOX = `http://127.0.0.1:${process.env.INFALL_OUTBOX_PORT ?? '8092'}`;

interface Mail {
  id: number;
  to: string[];
  subject: string;
  text: string;
  html: string;
}

let browser: Browser;
const contexts: BrowserContext[] = [];
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  for (const c of contexts) await c.close().catch(() => undefined);
  await browser?.close();
});

/** A fresh browser (no cookies) at phone width, recording console errors, page errors and failed requests. */
async function freshPhone(): Promise<{ page: Page; problems: string[] }> {
  const ctx = await newContext(browser, 'phone');
  contexts.push(ctx);
  const page = await ctx.newPage();
  const problems: string[] = [];
  page.on('console', (m: ConsoleMessage) => {
    // Only the app's own pages count: the local fakes' pages (the mail sink, the sign-in
    // provider) are not the product, and their missing favicons log 404s.
    const at = m.location().url;
    if (m.type() === 'error' && (!at || at.startsWith(baseUrl()))) problems.push(`console error: ${m.text()} (${at})`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('response', (r) => {
    if (r.status() >= 400 && r.url().startsWith(baseUrl())) problems.push(`${r.status()} ${r.url()}`);
  });
  return { page, problems };
}

/** Clicks the provider's "another invented login" form: a student no test has used yet. */
async function signInAsNewStudent(page: Page, login: string): Promise<void> {
  await page.getByTestId('sign-in').click();
  await page.locator('#other').pressSequentially(login);
  await page.getByRole('button', { name: 'Sign in with the login typed above' }).click();
}

async function waitForMail(match: (m: Mail) => boolean, timeoutMs = 15_000): Promise<Mail> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const { messages } = (await (await fetch(`${OUTBOX}/messages`)).json()) as { messages: Mail[] };
    const found = messages.find(match);
    if (found) return found;
    if (Date.now() > until) throw new Error('no matching mail in the outbox');
    await new Promise((r) => setTimeout(r, 300));
  }
}

describe('signed out', () => {
  test.each(['/', '/sign-in', '/runs/00000000-0000-4000-8000-000000000000', '/compare?pair=00000000-0000-4000-8000-000000000000', '/cohorts/join?code=ABCD-2345'])(
    'loading %s logs no errors and no failed requests, and offers sign-in',
    async (path) => {
      const { page, problems } = await freshPhone();
      await page.goto(`${baseUrl()}${path}`);
      await page.getByTestId('sign-in').waitFor();
      await page.waitForLoadState('networkidle');
      expect(problems).toEqual([]);
      // The sign-in page keeps where the person was going, query and all.
      const next = new URL(page.url()).searchParams.get('next');
      if (path !== '/' && path !== '/sign-in') expect(next).toBe(path);
    },
  );
});

describe('an invitation mail, followed signed out on a phone', () => {
  const address = `e2e-invitee-${Date.now().toString(36)}@infall.example`;
  const login = `e2e-invitee-${Date.now().toString(36)}`;

  test('the instructor sends it from the cohort page', async () => {
    const { page } = await freshPhone();
    await signIn(page, 'Ilse Varga', '/cohorts');
    await page.getByRole('link', { name: /^Open cohort Galaxy Dynamics Lab/ }).click();
    const box = page.getByLabel('E-mail addresses to invite');
    await box.pressSequentially(address);
    await page.getByRole('button', { name: 'Send 1 invitation' }).click();
    await page.getByText('Sent 1 invitation.').waitFor();
  });

  test('its link, opened from the outbox in a fresh browser, signs in and lands joined', async () => {
    const mail = await waitForMail((m) => m.to.includes(address));
    expect(mail.subject).toBe('Join Galaxy Dynamics Lab, autumn (invented) on Infall');
    const { page, problems } = await freshPhone();
    // The mail as the person sees it, then its button.
    await page.goto(`${OUTBOX}/messages/${mail.id}/html`);
    const link = page.getByRole('link', { name: 'Join the cohort' });
    const href = (await link.getAttribute('href'))!;
    expect(new URL(href).pathname).toBe('/cohorts/join');
    expect(new URL(href).searchParams.get('code')).toBe('VRTX-42QM');
    await link.click();
    await page.getByTestId('sign-in').waitFor();
    await signInAsNewStudent(page, login);
    await page.waitForURL((u) => u.pathname === '/cohorts/join' && u.searchParams.get('code') === 'VRTX-42QM', { timeout: 20_000 });
    await page.getByText('You joined Galaxy Dynamics Lab, autumn (invented)').waitFor({ timeout: 20_000 });
    await shot(page, 'phone-links-01-joined');
    // The server agrees: the cohort is now the student's.
    const cohorts = await page.evaluate(async () => (await (await fetch('/api/cohorts')).json()) as { cohorts: { name: string }[] });
    expect(cohorts.cohorts.map((c) => c.name)).toContain('Galaxy Dynamics Lab, autumn (invented)');
    expect(problems).toEqual([]);
  });
});

describe('deep links and clones of stored runs', () => {
  let runs: { id: string; name: string; status: string }[] = [];

  test('every seeded run, the failed one with extreme values included, opens in the new-run form as a clone', async () => {
    const { page, problems } = await freshPhone();
    await signIn(page, 'Rafael Okoye', '/');
    runs = (await page.evaluate(async () => (await (await fetch('/api/runs?limit=100')).json()) as { runs: { id: string; name: string; status: string }[] })).runs;
    const seeded = runs.filter((r) => r.name.includes('(invented)') || r.name === 'First Plummer sphere');
    expect(seeded.length).toBeGreaterThanOrEqual(7);
    for (const run of seeded) {
      await page.goto(`${baseUrl()}/runs/new?from=${run.id}`);
      await page.getByTestId('launch').waitFor({ timeout: 20_000 });
      expect(await page.getByTestId('screen-failure').count()).toBe(0);
      expect(await page.getByText(`A copy of “${run.name}”`, { exact: false }).count()).toBe(1);
    }
    await shot(page, 'phone-links-02-clone-last');
    expect(problems).toEqual([]);
  });

  test('a run page opened signed out comes back to that run after sign-in', async () => {
    const run = runs.find((r) => r.name.startsWith('Unsoftened close pair'))!;
    const { page, problems } = await freshPhone();
    await page.goto(`${baseUrl()}/runs/${run.id}`);
    await page.getByTestId('sign-in').click();
    await page.getByRole('button', { name: /^Sign in as Teodora Vance/ }).click();
    await page.waitForURL((u) => u.pathname === `/runs/${run.id}`, { timeout: 20_000 });
    await page.getByText(run.name).first().waitFor();
    expect(await page.getByTestId('screen-failure').count()).toBe(0);
    await shot(page, 'phone-links-03-deep-link');
    expect(problems).toEqual([]);
  });
});
