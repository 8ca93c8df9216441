import type { Browser, Page } from 'playwright-core';
import { baseUrl, fullShot, launch, newContext, signIn, typeInto } from './support/browser';

// Numbers typed into the new-run form key by key on a phone, as a researcher would: scientific
// notation, a leading point, a decimal comma that must be refused in words. The spec the browser
// posts and the run the server stores carry exactly the typed values.

jest.setTimeout(180_000);

let browser: Browser;
let page: Page;
const errors: string[] = [];

beforeAll(async () => {
  browser = await launch();
  const ctx = await newContext(browser, 'phone');
  page = await ctx.newPage();
  page.on('pageerror', (e) => errors.push(e.message));
});
afterAll(async () => {
  await browser?.close();
});

describe('numbers typed key by key on a phone', () => {
  it('keeps 4e10, 1.2e-10 and .5 as typed, refuses 0,25 in words, and submits the typed values', async () => {
    await signIn(page, 'Teodora Vance', '/runs/new');
    const mass = page.getByTestId('field-model.mass_Msun');
    await mass.waitFor();
    // A phone gets a keyboard with letters, so "e" can be typed.
    expect(await mass.getAttribute('inputmode')).toBeNull();

    await typeInto(page, mass, '4e');
    expect(await mass.inputValue()).toBe('4e');
    await page.getByText(/^Mass is not a number yet/).waitFor();
    expect(await mass.getAttribute('aria-invalid')).toBe('true');
    expect(await page.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
    await mass.pressSequentially('10', { delay: 30 });
    expect(await mass.inputValue()).toBe('4e10');

    await typeInto(page, page.getByTestId('field-model.scale_kpc'), '.5');

    await page.getByTestId('law-first').getByRole('radio', { name: 'MOND (algebraic)' }).click();
    const a0 = page.getByTestId('field-law.a0_m_s2');
    await typeInto(page, a0, '1.2e-10');
    expect(await a0.inputValue()).toBe('1.2e-10');
    await page.getByText('a₀', { exact: true }).waitFor();

    const softening = page.getByTestId('field-softening_kpc');
    await typeInto(page, softening, '0,25');
    expect(await softening.inputValue()).toBe('0,25');
    await page.getByText(/^Softening ε is not a number: use a point for decimals/).waitFor();
    expect(await page.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
    await fullShot(page, 'phone-number-entry-comma');

    await typeInto(page, softening, '0.25');
    await page.waitForFunction(() => document.querySelector('[data-testid="launch"]')?.getAttribute('aria-disabled') !== 'true');
    await fullShot(page, 'phone-number-entry');

    const [post] = await Promise.all([page.waitForRequest((r) => r.method() === 'POST' && new URL(r.url()).pathname === '/api/runs'), page.getByTestId('launch').click()]);
    const sent = post.postDataJSON() as { spec: { model: Record<string, unknown>; law: Record<string, unknown>; softening_kpc: number } };
    expect(sent.spec.model).toMatchObject({ kind: 'plummer', mass_Msun: 4e10, scale_kpc: 0.5 });
    expect(sent.spec.law).toMatchObject({ kind: 'mond', a0_m_s2: 1.2e-10 });
    expect(sent.spec.softening_kpc).toBe(0.25);

    await page.waitForURL((u) => /^\/runs\/[^/]+$/.test(u.pathname) && u.pathname !== '/runs/new', { timeout: 30_000 });
    const id = new URL(page.url()).pathname.split('/').pop()!;
    const stored = await page.request.get(`${baseUrl()}/api/runs/${id}`);
    expect(stored.status()).toBe(200);
    const run = (await stored.json()) as { spec: typeof sent.spec };
    expect(run.spec.model).toMatchObject({ mass_Msun: 4e10, scale_kpc: 0.5 });
    expect(run.spec.law).toMatchObject({ a0_m_s2: 1.2e-10 });
    expect(run.spec.softening_kpc).toBe(0.25);
    expect(errors).toEqual([]);
  });
});
