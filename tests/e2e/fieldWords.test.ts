import type { Browser, Locator } from 'playwright-core';
import { NAME_MAX_LENGTH } from '../../shared/spec';
import { fullShot, launch, newContext, signIn, typeInto, type ViewportName } from './support/browser';

// Words at the field, at phone and desk widths: a cross-field refusal typed key by key reads as a
// sentence with units under the field it marks, names of every kind share one limit and are refused
// beside their field, range hints give limits exactly, and long chips stay inside their panel.

jest.setTimeout(240_000);

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

/** The alert shown in a field's own frame (label, input row, message). */
const alertOf = (field: Locator) => field.locator('xpath=../..').getByRole('alert');

describe.each(['phone', 'wide'] as ViewportName[])('at %s width', (viewport) => {
  test('the launch form words a cross-field refusal for people, at its field, and gives the seed’s limit exactly', async () => {
    const page = await (await newContext(browser, viewport)).newPage();
    await signIn(page, 'Priya Ndlovu', '/runs/new');
    const truncation = page.getByTestId('field-model.truncationRadius_kpc');
    await truncation.waitFor();
    await typeInto(page, truncation, '1.2e-10');
    expect(await truncation.inputValue()).toBe('1.2e-10');
    await alertOf(truncation).filter({ hasText: /^Truncation radius/ }).waitFor();
    expect(await alertOf(truncation).textContent()).toBe('Truncation radius 1.2e-10 kpc is below 1% of the scale radius (1 kpc): the model would hold almost none of its mass');
    expect(await page.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
    const seedHint = await page.getByTestId('field-seed').locator('xpath=../..').textContent();
    expect(seedHint).toContain('Range 0 – 4\u2009294\u2009967\u2009295');
    await fullShot(page, `${viewport}-field-words-launch`);
    await page.context().close();
  });

  test('a cohort name over the one limit is refused beside its field, and the publish chips stay inside their panel', async () => {
    const page = await (await newContext(browser, viewport)).newPage();
    await signIn(page, 'Ilse Varga', '/cohorts');
    const name = page.getByTestId('cohort-name');
    await name.waitFor();
    expect(await name.locator('xpath=../..').textContent()).toContain(`Up to ${NAME_MAX_LENGTH} characters.`);
    await name.click();
    await page.keyboard.insertText('n'.repeat(NAME_MAX_LENGTH));
    await name.pressSequentially('n');
    await alertOf(name).waitFor();
    expect(await alertOf(name).textContent()).toBe(`name is at most ${NAME_MAX_LENGTH} characters`);
    expect(await page.getByRole('button', { name: 'Create' }).getAttribute('aria-disabled')).toBe('true');

    await page.getByRole('link', { name: /^Open cohort Galaxy Dynamics Lab/ }).click();
    const template = page.getByTestId('template-name');
    await template.waitFor();
    // Every chip of the "publish a run" group lies within the group's width, however long the run's name.
    const group = page.getByRole('radiogroup').last();
    const box = (await group.boundingBox())!;
    const chips = await group.getByRole('radio').evaluateAll((els) => els.map((e) => e.getBoundingClientRect().right));
    expect(chips.length).toBeGreaterThan(0);
    for (const right of chips) expect(right).toBeLessThanOrEqual(box.x + box.width + 0.5);
    await fullShot(page, `${viewport}-field-words-cohort`);
    await page.context().close();
  });
});
