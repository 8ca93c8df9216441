import type { Browser, Page } from 'playwright-core';
import { fieldKind, memberKind, specJsonSchema, type JsonNode } from '../../components/launch/schemaForm';
import { lawModules, modelModules } from '../../shared/engine';
import { fullShot, launch, newContext, signIn, type ViewportName } from './support/browser';

// The new-run form draws every registered law and model from its schema alone: in Chromium, on
// a phone and on a wide screen, each model and each law is picked and every number of its schema
// must have its field; an encounter's systems, a live halo and a field-form external field are
// switched on and typed into key by key. Screenshots go to artifacts/ for a person to look at.

jest.setTimeout(300_000);

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

const members = (key: 'law' | 'model') => {
  const node = specJsonSchema().properties![key];
  return new Map((node.oneOf ?? node.anyOf ?? []).map((m) => [String(memberKind(m)), m]));
};
const numberKeys = (node: JsonNode) => Object.entries(node.properties ?? {}).filter(([, c]) => fieldKind(c) === 'number').map(([k]) => k);

async function expectFields(page: Page, prefix: string, keys: string[]): Promise<void> {
  for (const key of keys) await page.getByTestId(`field-${prefix}${key}`).first().waitFor({ timeout: 10_000 });
}

for (const viewport of ['phone', 'wide'] as ViewportName[]) {
  it(`draws every model and law from its schema (${viewport})`, async () => {
    const page = await (await newContext(browser, viewport)).newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signIn(page, 'Teodora Vance', '/runs/new');
    await page.getByTestId('law-first').waitFor();
    const models = members('model');
    for (const m of modelModules()) {
      await page.getByRole('radiogroup', { name: 'Model' }).getByRole('radio', { name: m.label, exact: true }).click();
      await expectFields(page, 'model.', numberKeys(models.get(m.kind)!));
      // A model made of systems: each system's own fields, and another system picked.
      for (const [key, child] of Object.entries(models.get(m.kind)!.properties!)) {
        if (fieldKind(child) !== 'union' || key === 'equilibriumLaw') continue;
        const systems = (child.oneOf ?? child.anyOf)!;
        const last = systems[systems.length - 1];
        const label = modelModules().find((s) => s.kind === memberKind(last))!.label;
        await page.getByRole('radiogroup', { name: child.title }).getByRole('radio', { name: label, exact: true }).click();
        await expectFields(page, `model.${key}.`, numberKeys(last));
        await fullShot(page, `launch-${viewport}-${m.kind}`);
      }
      // An optional part switched on starts from values the schema accepts.
      const halo = Object.entries(models.get(m.kind)!.properties!).find(([k, c]) => fieldKind(c) === 'object' && !(models.get(m.kind)!.required ?? []).includes(k) && c.properties?.n);
      if (halo) {
        await page.getByRole('switch', { name: halo[1].title }).first().click();
        await expectFields(page, `model.${halo[0]}.`, numberKeys(halo[1]));
        expect(await page.getByTestId('launch').getAttribute('aria-disabled')).not.toBe('true');
        await fullShot(page, `launch-${viewport}-${m.kind}-with-part`);
      }
    }
    const laws = members('law');
    const first = page.getByTestId('law-first');
    for (const l of lawModules()) {
      await first.getByRole('radio', { name: l.shortLabel, exact: true }).click();
      await expectFields(page, 'law.', numberKeys(laws.get(l.kind)!));
      const vector = Object.entries(laws.get(l.kind)!.properties!).find(([, c]) => fieldKind(c) === 'tuple');
      if (vector) {
        await first.getByRole('switch', { name: vector[1].title }).click();
        const x = page.getByTestId(`field-law.${vector[0]}.0`);
        await x.click();
        await page.keyboard.press('ControlOrMeta+A');
        await page.keyboard.press('Backspace');
        await x.pressSequentially('1.2e-10', { delay: 30 });
        expect(await x.inputValue()).toBe('1.2e-10');
        expect(await x.getAttribute('aria-invalid')).not.toBe('true');
        await fullShot(page, `launch-${viewport}-${l.kind}-vector`);
      }
    }
    expect(errors).toEqual([]);
  });
}
