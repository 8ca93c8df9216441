import { LaunchForm } from '../../components/launch/LaunchForm';
import { setCsrfToken } from '../../components/lib/api';
import { NAME_MAX_LENGTH } from '../../shared/spec';
import { mockApi } from './support/api';
import { navigation, resetNavigation } from './support/expoRouter';
import { press, render, settle, type } from './support/render';
import { freshUsage } from './support/usage';

jest.mock('expo-router', () => require('./support/expoRouter'));

const usage = freshUsage();

beforeEach(() => {
  resetNavigation();
  setCsrfToken('csrf-abc');
});

const field = (container: HTMLElement, key: string) => container.querySelector(`[data-testid="field-${key}"]`) as HTMLInputElement;

describe('the new-run form', () => {
  it('shows the cost against the budget and refuses what the quota would refuse', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    expect(view.getByTestId('cost-total').textContent).toContain('N = 500');
    type(field(container, 'model.n'), '5000');
    await settle();
    expect(view.getByText(/Would be refused\. This run has 5 000 particles; your limit is 2 000 particles per run\./)).toBeTruthy();
  });

  it('offers the engine\'s suggested timestep when the chosen one is too coarse', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    expect(view.queryByTestId('use-suggested-timestep')).toBeNull();
    type(field(container, 'timestep_Myr'), '2');
    await settle();
    const offer = view.getByTestId('use-suggested-timestep');
    expect(offer.textContent).toMatch(/^Use the suggested timestep, 0\.\d+ Myr$/);
    press(offer);
    await settle();
    const dt = Number(field(container, 'timestep_Myr').value);
    expect(dt).toBeLessThan(2);
    expect(offer.textContent).toContain(String(dt));
    expect(view.queryByTestId('use-suggested-timestep')).toBeNull();
  });

  it('flags a value outside the schema range at its field and disables launching', async () => {
    mockApi({ 'GET /api/account/usage': { body: usage } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    type(field(container, 'model.n'), '1');
    await settle();
    expect(view.getByText('Allowed: 2 – 100 000')).toBeTruthy();
    expect(view.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
  });

  it('submits a pair with the CSRF token and opens the compare page', async () => {
    const calls = mockApi({
      'GET /api/account/usage': { body: usage },
      'POST /api/runs': (call) => ({ status: 201, body: { runs: [{ id: 'r1', pairId: 'p1' }, { id: 'r2', pairId: 'p1' }].map((r) => ({ ...r, body: call.body })) } }),
    });
    const { view } = render(<LaunchForm />);
    await settle();
    press(view.getByRole('switch', { name: 'Run as a pair under a second law' }));
    await settle();
    const second = view.getByTestId('law-second');
    press(second.querySelector('[aria-label="Emergent"]')!);
    await settle();
    press(view.getByTestId('launch'));
    await settle();
    const post = calls.find((c) => c.method === 'POST')!;
    expect(post.headers['X-CSRF-Token']).toBe('csrf-abc');
    expect(post.body).toMatchObject({ spec: { model: { kind: 'plummer', n: 500 }, law: { kind: 'newton' } }, pairLaw: { kind: 'emergent' } });
    expect(navigation.replaced).toEqual([{ pathname: '/compare', params: { pair: 'p1' } }]);
  });

  it('shows the field the server names in an INVALID_SPEC error', async () => {
    mockApi({
      'GET /api/account/usage': { body: usage },
      'POST /api/runs': { status: 400, body: { error: { code: 'INVALID_SPEC', message: 'spec.softening_kpc: too large for this model', field: 'spec.softening_kpc' } } },
    });
    const { container, view } = render(<LaunchForm />);
    await settle();
    press(view.getByTestId('launch'));
    await settle();
    expect(view.getAllByText('spec.softening_kpc: too large for this model').length).toBeGreaterThan(0);
    expect(field(container, 'softening_kpc').getAttribute('aria-invalid')).toBe('true');
  });

  it('puts the typed name in spec.name, and says at the name field when it is too long', async () => {
    const calls = mockApi({ 'GET /api/account/usage': { body: usage }, 'POST /api/runs': { status: 201, body: { runs: [{ id: 'r1', pairId: null }] } } });
    const { container, view } = render(<LaunchForm />);
    await settle();
    const name = container.querySelector('[data-testid="field-name"]') as HTMLInputElement;
    type(name, 'x'.repeat(NAME_MAX_LENGTH + 1));
    await settle();
    expect(view.getByRole('alert').textContent).toBe(`name is at most ${NAME_MAX_LENGTH} characters`);
    expect(view.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
    type(name, 'Kestrel check (invented)');
    await settle();
    expect(view.queryByRole('alert')).toBeNull();
    press(view.getByTestId('launch'));
    await settle();
    const post = calls.find((c) => c.method === 'POST')!;
    expect(post.body).toEqual(expect.objectContaining({ spec: expect.objectContaining({ name: 'Kestrel check (invented)' }) }));
    expect((post.body as { name?: string }).name).toBeUndefined();
  });

  it('shows a name the server refuses at the name field', async () => {
    mockApi({
      'GET /api/account/usage': { body: usage },
      'POST /api/runs': { status: 400, body: { error: { code: 'BAD_REQUEST', message: 'name: "a" differs from spec.name "b"', field: 'name' } } },
    });
    const { container, view } = render(<LaunchForm />);
    await settle();
    press(view.getByTestId('launch'));
    await settle();
    const frame = (container.querySelector('[data-testid="field-name"]') as HTMLElement).parentElement!.parentElement!;
    expect(frame.querySelector('[role="alert"]')?.textContent).toBe('name: "a" differs from spec.name "b"');
  });

  it('balances each run of a pair for its own law, or pins one law for both when asked', async () => {
    const calls = mockApi({ 'GET /api/account/usage': { body: usage }, 'POST /api/runs': { status: 201, body: { runs: [{ id: 'r1', pairId: null }] } } });
    const { view } = render(<LaunchForm />);
    await settle();
    press(view.getByRole('radio', { name: 'Exponential disk' }));
    press(view.getByRole('switch', { name: 'Run as a pair under a second law' }));
    await settle();
    press(view.getByTestId('launch'));
    await settle();
    const own = calls.filter((c) => c.method === 'POST')[0]!.body as { spec: { model: Record<string, unknown> }; pairLaw: { kind: string } };
    expect(own.pairLaw.kind).toBe('qumond');
    expect(own.spec.model.kind).toBe('disk');
    expect(own.spec.model).not.toHaveProperty('equilibriumLaw');
    press(view.getByRole('radio', { name: /\(first law\)$/ }));
    await settle();
    press(view.getByTestId('launch'));
    await settle();
    const pinned = calls.filter((c) => c.method === 'POST')[1]!.body;
    expect(pinned).toMatchObject({ spec: { model: { kind: 'disk', equilibriumLaw: { kind: 'newton' } } }, pairLaw: { kind: 'qumond' } });
    // Two disk previews (the thick disk's field) on a shared machine take a few seconds.
  }, 30_000);
});
