// The launch form's half of the registries' proof (tests/engine/registryProof.test.ts has the
// schema, command line, preview and run): with a throwaway law and a throwaway model added by one
// list line each, the rendered form offers both, draws their fields from their schemas' titles,
// checks their bounds and submits them.
jest.mock('../../shared/engine/laws/list', () => ({
  LAW_MODULES: [...jest.requireActual('../../shared/engine/laws/list').LAW_MODULES, require('../fixtures/registry/boostedGLaw').boostedGLaw],
}));
jest.mock('../../shared/engine/models/list', () => ({
  MODEL_MODULES: [...jest.requireActual('../../shared/engine/models/list').MODEL_MODULES, require('../fixtures/registry/coldSphereModel').coldSphereModule],
}));
jest.mock('expo-router', () => require('./support/expoRouter'));

import { LaunchForm } from '../../components/launch/LaunchForm';
import { setCsrfToken } from '../../components/lib/api';
import { mockApi } from './support/api';
import { resetNavigation } from './support/expoRouter';
import { press, render, settle, type } from './support/render';
import { freshUsage } from './support/usage';

beforeEach(() => {
  resetNavigation();
  setCsrfToken('csrf-abc');
});

const field = (container: HTMLElement, key: string) => container.querySelector(`[data-testid="field-${key}"]`) as HTMLInputElement | null;

it('offers the new law and model, draws their fields from their schemas, and submits them', async () => {
  const calls = mockApi({
    'GET /api/account/usage': { body: freshUsage() },
    'POST /api/runs': { status: 201, body: { runs: [{ id: 'r1', pairId: null }] } },
  });
  const { container, view } = render(<LaunchForm />);
  await settle();
  press(container.querySelector('[aria-label="Cold sphere"]')!);
  await settle();
  press(container.querySelector('[aria-label="Boosted G"]')!);
  await settle();
  // Fields named by the schemas' titles, filled from the modules' presets.
  expect(view.getByText('Sphere radius', { exact: false })).toBeTruthy();
  expect(view.getByText('G raised by', { exact: false })).toBeTruthy();
  expect(field(container, 'model.radius_kpc')!.value).toBe('2');
  expect(field(container, 'law.boost')!.value).toBe('0.25');
  // The schema's bounds hold at the field and block launching.
  type(field(container, 'law.boost')!, '3');
  await settle();
  expect(view.getByText('Allowed: 0 – 1')).toBeTruthy();
  expect(view.getByTestId('launch').getAttribute('aria-disabled')).toBe('true');
  type(field(container, 'law.boost')!, '0.5');
  type(field(container, 'model.radius_kpc')!, '3');
  await settle();
  press(view.getByTestId('launch'));
  await settle();
  const post = calls.find((c) => c.method === 'POST')!;
  expect(post.body).toMatchObject({ spec: { model: { kind: 'coldSphere', n: 300, mass_Msun: 1e10, radius_kpc: 3 }, law: { kind: 'boostedG', boost: 0.5 } } });
});
