import type { Browser } from 'playwright-core';
import { formatValue } from '../../components/format';
import { lawModule, precheck } from '../../shared/engine';
import { defaultRunSpec, runSpecSchema, type LawSpec } from '../../shared/spec';
import { launch, newContext, shot, signIn, typeInto } from './support/browser';

// The new-run form's preview runs the engine (drawing the initial particles for its checks; a grid
// solve per draft under field-form MOND) in a web worker, so typing never waits on it. Typed key
// by key on a phone, the checks that stay on screen must be those of the last draft, as the
// engine gives them in Node for the same spec: answers to drafts the form has moved past are dropped.

jest.setTimeout(120_000);

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

test('the preview is computed in a web worker and ends on the typed draft under field-form MOND', async () => {
  const page = await (await newContext(browser, 'phone')).newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));
  const workers: string[] = [];
  page.on('worker', (w) => workers.push(w.url()));
  await signIn(page, 'Teodora Vance', '/runs/new');
  await page.getByTestId('field-model.n').waitFor();
  await page.getByTestId('law-first').getByRole('radio', { name: lawModule('qumond').shortLabel }).click();
  await typeInto(page, page.getByTestId('field-model.n'), '3000');

  const base = defaultRunSpec();
  const spec = runSpecSchema.parse({ ...base, law: lawModule('qumond').preset as LawSpec, model: { ...base.model, n: 3000 } });
  const t = precheck(spec).timescales;
  expect(t.relaxationTime_Myr).not.toBeNull();
  await page.getByLabel(`relaxation time: ${formatValue(t.relaxationTime_Myr!)} Myr`).waitFor({ timeout: 30_000 });
  await page.getByLabel(`crossing time: ${formatValue(t.crossingTime_Myr)} Myr`).waitFor();
  await page.getByLabel(`steps: `, { exact: false }).first().scrollIntoViewIfNeeded();
  await shot(page, 'preview-worker-phone', false);
  expect(workers.filter((u) => /\/previewWorker-[0-9a-f]+\.js$/.test(u))).toHaveLength(1);
  expect(errors).toEqual([]);
});
