import { act } from 'react';
import { fireEvent, getDefaultNormalizer } from '@testing-library/dom';
import { LaunchForm } from '../../components/launch/LaunchForm';
import { QuotaEditor } from '../../components/cohorts/QuotaEditor';
import { parseNumberText } from '../../components/numberText';
import { setCsrfToken } from '../../components/lib/api';
import { COHORT_CEILING, LIMIT_CEILINGS, ROLE_LIMITS } from '../../shared/api/accounts';
import { mockApi } from './support/api';
import { resetNavigation } from './support/expoRouter';
import { press, render, settle } from './support/render';
import { freshUsage } from './support/usage';

jest.mock('expo-router', () => require('./support/expoRouter'));
// Every key re-renders the form and its engine preview; a loaded machine needs more than 5 s.
jest.setTimeout(30_000);

const usage = freshUsage();

beforeEach(() => {
  resetNavigation();
  setCsrfToken('csrf-abc');
});

/** Types like a person: one change event per key, each text one character longer. */
function typeKeys(el: HTMLInputElement, text: string, { clear = true } = {}): void {
  let current = clear ? '' : el.value;
  if (clear) act(() => void fireEvent.change(el, { target: { value: '' } }));
  for (const ch of text) {
    current += ch;
    act(() => void fireEvent.change(el, { target: { value: current } }));
  }
}

// Thin spaces group digits; the default normalizer would turn them into plain spaces.
const exact = getDefaultNormalizer({ collapseWhitespace: false, trim: false });
const input = (container: HTMLElement, testID: string) => container.querySelector(`[data-testid="${testID}"]`) as HTMLInputElement;
const UPLOADS = { maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows };
const fieldText = (el: HTMLElement) => el.closest('[data-testid]')!.parentElement!.parentElement!.textContent ?? '';

describe('reading typed numbers', () => {
  test.each([
    ['4e10', 4e10],
    ['4E10', 4e10],
    ['1.2e-10', 1.2e-10],
    ['-3.5e+2', -350],
    ['.5', 0.5],
    ['5.', 5],
    [' 42 ', 42],
    ['1_000', 1000],
    ['5\u2009000\u2009000', 5e6],
    ['5 000', 5000],
    ['\u22122.5', -2.5],
  ])('%j reads as %p', (text, value) => {
    expect(parseNumberText(text)).toEqual({ state: 'number', value });
  });

  test('empty text is empty, not zero', () => {
    expect(parseNumberText('')).toEqual({ state: 'empty' });
    expect(parseNumberText('  ')).toEqual({ state: 'empty' });
  });

  test.each([
    ['0,25', /use a point for decimals \(0\.25\), not a comma/],
    ['1,000', /^not a number: group digits with a space or _ \(1 000\) and write decimals with a point; commas are not used$/],
    ['2,5e3', /use a point for decimals \(2\.5e3\), not a comma/],
    ['1,2,3', /use a point for decimals \(0\.25\), not a comma/],
    ['4e', /put the power of ten after the e/],
    ['1.2e-', /put the power of ten after the e/],
    ['abc', /^not a number: type digits/],
    ['1.2.3', /^not a number/],
    ['0x10', /^not a number/],
    ['Infinity', /^not a number/],
    ['1__000', /between two digits/],
    ['_5', /between two digits/],
    ['1e400', /too large/],
    ['4 e10', /between two digits|^not a number/],
  ])('%j does not parse, and says why', (text, problem) => {
    const r = parseNumberText(text);
    expect(r.state).toBe('invalid');
    expect(r.state === 'invalid' && r.problem).toMatch(problem);
  });
});

describe('numbers typed key by key into the new-run form', () => {
  async function openForm() {
    const calls = mockApi({
      'GET /api/account/usage': { body: usage },
      'POST /api/runs': (call) => ({ status: 201, body: { runs: [{ id: 'r1', pairId: null, body: call.body }] } }),
    });
    const rendered = render(<LaunchForm />);
    await settle();
    return { ...rendered, calls };
  }

  test('4e10 in Mass, 1.2e-10 in a₀ and .5 in the scale radius are submitted as typed', async () => {
    const { container, view, calls } = await openForm();
    const mass = input(container, 'field-model.mass_Msun');
    typeKeys(mass, '4e10');
    expect(mass.value).toBe('4e10');
    typeKeys(input(container, 'field-model.scale_kpc'), '.5');
    press(view.getByRole('radio', { name: 'MOND (algebraic)' }));
    await settle();
    const a0 = input(container, 'field-law.a0_m_s2');
    typeKeys(a0, '1.2e-10');
    expect(a0.value).toBe('1.2e-10');
    await settle();
    expect(view.getByTestId('launch').getAttribute('aria-disabled')).not.toBe('true');
    press(view.getByTestId('launch'));
    await settle();
    const post = calls.find((c) => c.method === 'POST')!;
    expect(post.body).toMatchObject({ spec: { model: { kind: 'plummer', mass_Msun: 4e10, scale_kpc: 0.5 }, law: { kind: 'mond', a0_m_s2: 1.2e-10 } } });
  });

  test('while a field does not parse it keeps the text, says "not a number" with its name, and launching is blocked', async () => {
    const { container, view, calls } = await openForm();
    const mass = input(container, 'field-model.mass_Msun');
    typeKeys(mass, '4e');
    await settle();
    expect(mass.value).toBe('4e');
    expect(mass.getAttribute('aria-invalid')).toBe('true');
    expect(view.getByText(/^Mass is not a number yet/)).toBeTruthy();
    expect(view.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
    press(view.getByTestId('launch'));
    await settle();
    expect(calls.some((c) => c.method === 'POST')).toBe(false);

    const soft = input(container, 'field-softening_kpc');
    typeKeys(soft, '0,25');
    await settle();
    expect(soft.value).toBe('0,25');
    expect(view.getByText(/^Softening ε is not a number: use a point for decimals/)).toBeTruthy();

    typeKeys(input(container, 'field-duration_Myr'), 'abc');
    await settle();
    expect(input(container, 'field-duration_Myr').value).toBe('abc');
    expect(view.getByText(/^Duration is not a number/)).toBeTruthy();
    expect(view.queryByText(/Required/i)).toBeNull();
    expect(view.getByText('3 fields need attention: Mass, Duration, Softening ε.')).toBeTruthy();

    // Finishing the exponent makes it a number again, without rewriting what was typed.
    typeKeys(mass, '10', { clear: false });
    await settle();
    expect(mass.value).toBe('4e10');
    expect(mass.getAttribute('aria-invalid')).toBe('false');
  });

  test('the keyboard offered on phones can type an exponent', async () => {
    const { container } = await openForm();
    const mass = input(container, 'field-model.mass_Msun');
    // A decimal or numeric keypad has no "e"; no inputmode leaves the full keyboard.
    expect(mass.getAttribute('inputmode')).toBeNull();
    expect(mass.getAttribute('type')).toBe('text');
  });

  test('a preset still replaces the numbers when the model changes', async () => {
    const { container, view } = await openForm();
    typeKeys(input(container, 'field-model.mass_Msun'), '4e');
    press(view.getByRole('radio', { name: 'Hernquist sphere' }));
    await settle();
    expect(input(container, 'field-model.mass_Msun').value).toBe('5e10');
  });

  test('labels keep the case of their symbols', async () => {
    const { view } = await openForm();
    press(view.getByRole('radio', { name: 'MOND (algebraic)' }));
    await settle();
    for (const label of ['a₀', 'Softening ε', 'Timestep Δt']) {
      const el = view.getByText(label);
      expect(getComputedStyle(el).textTransform).not.toBe('uppercase');
    }
  });
});

describe('the person\u2019s own limits in the new-run form', () => {
  test('range hints show the quota, and the field that breaks it is marked in words', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    const n = input(container, 'field-model.n');
    expect(fieldText(n)).toMatch(/Range 2 – 100\u2009000 · your limit 2\u2009000 particles/);
    expect(fieldText(input(container, 'field-duration_Myr'))).toMatch(/your limit 10\u2009000 steps, 2\u2009000 Myr at this timestep/);
    typeKeys(n, '5000');
    await settle();
    expect(n.getAttribute('aria-invalid')).toBe('true');
    expect(fieldText(n)).toContain('5\u2009000 particles is over your limit of 2\u2009000 per run');
    expect(view.getByText('Would be refused. This run has 5\u2009000 particles; your limit is 2\u2009000 particles per run.', { normalizer: exact })).toBeTruthy();

    // The mark stays while another field is half-typed (and the cost cannot be counted).
    typeKeys(input(container, 'field-softening_kpc'), '0,');
    await settle();
    expect(fieldText(n)).toContain('5\u2009000 particles is over your limit of 2\u2009000 per run');
    typeKeys(input(container, 'field-softening_kpc'), '0.05');

    typeKeys(n, '500');
    typeKeys(input(container, 'field-snapshotEvery'), '100');
    typeKeys(input(container, 'field-duration_Myr'), '3000');
    await settle();
    expect(input(container, 'field-duration_Myr').getAttribute('aria-invalid')).toBe('true');
    expect(view.getByText(/^Would be refused\. This run takes 15\u2009000 steps \(duration ÷ timestep\); your limit is 10\u2009000 steps per run\./, { normalizer: exact })).toBeTruthy();
  });
});

describe('quota fields', () => {
  test('a cohort quota takes 1e9 typed key by key, keeps 2,5 as typed, and stops at what instructors have', async () => {
    const saved: unknown[] = [];
    const { container, view } = render(<QuotaEditor value={{ maxParticles: 1000, maxSteps: 4000, maxConcurrentRuns: 2, dailyInteractions: 1e9, ...UPLOADS }} onSave={(q) => saved.push(q)} saving={false} error={null} />);
    const daily = input(container, 'quota-dailyInteractions');
    typeKeys(daily, '2e9');
    const runs = input(container, 'quota-maxConcurrentRuns');
    typeKeys(runs, '2,5');
    expect(runs.value).toBe('2,5');
    expect(view.getByText(/^Runs at a time is not a number: use a point/)).toBeTruthy();
    const save = view.getByRole('button', { name: 'Save quota' });
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(runs, '3');
    const particles = input(container, 'quota-maxParticles');
    typeKeys(particles, String(COHORT_CEILING.maxParticles + 1));
    expect(fieldText(particles)).toContain('Allowed: 1 – 10\u2009000');
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(particles, '1e4');
    expect(save.getAttribute('aria-disabled')).not.toBe('true');
    press(save);
    expect(saved).toEqual([{ maxParticles: 10000, maxSteps: 4000, maxConcurrentRuns: 3, dailyInteractions: 2e9, ...UPLOADS }]);
  });

  test('a cohort quota shows the upload limits, the file size in KB, and submits them typed key by key', async () => {
    const saved: unknown[] = [];
    const { container, view } = render(<QuotaEditor value={{ maxParticles: 1000, maxSteps: 4000, maxConcurrentRuns: 2, dailyInteractions: 1e9, ...UPLOADS }} onSave={(q) => saved.push(q)} saving={false} error={null} />);
    const bytes = input(container, 'quota-maxUploadBytes');
    const rows = input(container, 'quota-maxUploadRows');
    expect(bytes.value).toBe('256');
    expect(bytes.getAttribute('aria-label')).toBe('Largest table file in KB');
    expect(rows.value).toBe('2000');
    expect(fieldText(bytes)).toContain('Range 1 – 1\u2009024 KB');
    const save = view.getByRole('button', { name: 'Save quota' });

    // Over what instructors have (1 MB), then part of a KB: both marked, both block saving.
    typeKeys(bytes, '2048');
    expect(fieldText(bytes)).toContain('Allowed: 1 – 1\u2009024 KB');
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(bytes, '1.5');
    expect(bytes.value).toBe('1.5');
    expect(fieldText(bytes)).toContain('Largest table file takes whole numbers only');
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(bytes, '512');
    expect(bytes.value).toBe('512');
    typeKeys(rows, `${COHORT_CEILING.maxUploadRows + 1}`);
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(rows, '3e3');
    expect(rows.value).toBe('3e3');
    expect(save.getAttribute('aria-disabled')).not.toBe('true');
    press(save);
    expect(saved).toEqual([{ maxParticles: 1000, maxSteps: 4000, maxConcurrentRuns: 2, dailyInteractions: 1e9, maxUploadBytes: 512 * 1024, maxUploadRows: 3000 }]);
  });

  test("an admin's allocation takes upload limits up to the ceilings; an empty field is no override", async () => {
    const saved: unknown[] = [];
    const none = { maxParticles: null, maxSteps: null, maxConcurrentRuns: null, dailyInteractions: null, maxUploadBytes: null, maxUploadRows: null };
    const { container, view } = render(<QuotaEditor nullable ceiling={LIMIT_CEILINGS} value={{ ...none, maxUploadRows: 5000 }} onSave={(q) => saved.push(q)} saving={false} error={null} saveLabel="Save allocation" />);
    const bytes = input(container, 'quota-maxUploadBytes');
    const rows = input(container, 'quota-maxUploadRows');
    expect(bytes.value).toBe('');
    expect(fieldText(bytes)).toContain('Range 1 – 16\u2009384 KB');
    typeKeys(bytes, '16385');
    const save = view.getByRole('button', { name: 'Save allocation' });
    expect(save.getAttribute('aria-disabled')).toBe('true');
    typeKeys(bytes, '16384');
    typeKeys(rows, '');
    press(save);
    expect(saved).toEqual([{ ...none, maxUploadBytes: 16 * 1024 * 1024 }]);
  });
});
