import { act } from 'react';
import { RunView } from '../../components/run/RunView';
import { encodeSnapshots } from '../../shared/api/snapshots';
import { FakeEventSource, mockApi } from './support/api';
import { press, render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

const ID = '11111111-2222-4333-8444-555555555555';
const owner = { id: 7, login: 'teodora-vance', name: 'Teodora Vance' };
const spec = { version: 1, model: { kind: 'plummer', n: 3, mass_Msun: 1e10, scale_kpc: 1 }, law: { kind: 'newton' }, integrator: 'leapfrog', solver: { kind: 'direct' }, timestep_Myr: 0.5, duration_Myr: 10, softening_kpc: 0.05, snapshotEvery: 10, seed: 1 };
const summary = { id: ID, name: 'Wren test (invented)', modelKind: 'plummer', lawKind: 'newton', particles: 3, steps: 20, costInteractions: 180, pairId: null, error: null, createdAt: new Date().toISOString(), startedAt: null, finishedAt: null, owner };

function finishedOutput() {
  const row = (k: number) => ({ step: k * 10, time_Myr: k * 5, kineticEnergy: 1, potentialEnergy: -2, totalEnergy: -1, energyDrift: k ? 1e-6 * k : 0, momentum: { x: 0, y: 0, z: 0 }, momentumDrift: 1e-16, angularMomentum: { x: 0, y: 0, z: 0 }, angularMomentumDrift: 1e-15, virialRatio: 1, clausiusVirialRatio: 1, lagrangianRadii_kpc: { r10: 0.3, r50: 1, r90: 2.5 }, toomreQ: null });
  const curve = { step: 0, time_Myr: 0, radii_kpc: [0.5, 1.5], meanAzimuthal_km_s: [0, 0], particleCounts: [1, 2], circular_km_s: [50, 60] };
  return {
    law: { kind: 'newton', label: 'Newtonian', conservesEnergy: true, conservesMomentum: true, conservesAngularMomentum: true, hasPotential: true, validity: 'Weak field.', notes: 'Softened pairwise sum.' },
    timescales: { halfMassRadius_kpc: 1, rmsSpeed_km_s: 60, crossingTime_Myr: 16, relaxationTime_Myr: null, orbitalPeriod_Myr: null, suggestedTimestep_Myr: 0.3, steps: 20, forceEvaluations: 20, interactions: 180 },
    warnings: [{ code: 'timestep-coarse-for-crossing', severity: 'warning', message: 'timestep 0.5 Myr gives fewer than 50 steps per crossing time', source: 'common practice' }],
    diagnostics: [row(0), row(1), row(2)],
    rotationCurves: { initial: curve, final: { ...curve, time_Myr: 10 }, analytic: { radii_kpc: [0.5, 1.5], curves: [{ law: 'newton', label: 'Newtonian', v_km_s: [55, 65] }] } },
    summary: { particleCount: 3, totalSteps: 20, stepsCompleted: 20, forceEvaluations: 20, finalTime_Myr: 10, finalEnergyDrift: 2e-6, maxAbsEnergyDrift: 2e-6, finalMomentumDrift: 1e-16, finalAngularMomentumDrift: 1e-15, quantities: { energy: 'conserved', momentum: 'conserved', angularMomentum: 'conserved' } },
    snapshotParticles: 3,
    frames: [0, 1, 2].map((k) => ({ frame: k, step: k * 10, time_Myr: k * 5 })),
  };
}

const snapshots = encodeSnapshots({ labels: ['Plummer sphere'], component: new Uint8Array(3), frames: [0, 1, 2].map((k) => ({ step: k * 10, time_Myr: k * 5, positions: Float32Array.from([0, 0, 0, 1 + k, 0, 0, 0, 1, 0]) })) });

beforeEach(() => {
  FakeEventSource.instances = [];
  (globalThis as { EventSource?: unknown }).EventSource = FakeEventSource;
});

test('a running run follows its event stream, then shows its results when it ends', async () => {
  let finished = false;
  mockApi({
    'GET /api/auth/session': { body: { user: { ...owner, role: 'researcher', email: null }, csrfToken: 't' } },
    [`GET /api/runs/${ID}`]: () => ({ body: finished ? { ...summary, status: 'finished', progress: 1, spec, output: finishedOutput() } : { ...summary, status: 'running', progress: 0.1, spec, output: null } }),
    [`GET /api/runs/${ID}/snapshots?format=2`]: { bytes: snapshots },
  });
  const { view } = render(<RunView id={ID} />);
  await settle();
  expect(view.getByText('Integrating')).toBeTruthy();
  // What it runs is on the page from the start, not only once results exist.
  expect(view.getByTestId('spec-timestep_Myr').textContent).toBe('Timestep Δt0.5 Myr');
  expect(view.getByTestId('spec-law.kind').textContent).toBe('LawNewtonian');
  const source = FakeEventSource.instances[0];
  expect(source.url).toBe(`/api/runs/${ID}/events`);

  act(() => {
    source.onopen?.();
    source.emit('progress', { percent: 42.5, step: 8, totalSteps: 20, time_Myr: 4, energyDrift: -3.2e-6 });
  });
  expect(view.getByTestId('live-percent').textContent).toBe('42%');
  expect(view.getByText('ΔE/(K₀+|W₀|) = -3.20e-6')).toBeTruthy();
  expect(view.getByText('● live')).toBeTruthy();

  finished = true;
  act(() => source.emit('end', { status: 'finished' }));
  await settle(10);
  expect(source.closed).toBe(true);
  expect(view.queryByTestId('live-percent')).toBeNull();
  expect(view.getByText('Outcome')).toBeTruthy();
  expect(view.getByText('timestep 0.5 Myr gives fewer than 50 steps per crossing time')).toBeTruthy();
  expect(view.getByText('Domain of validity')).toBeTruthy();
  expect(view.getByText(/Numerical model\./)).toBeTruthy();
  expect(view.getByTestId('playhead-readout').textContent).toBe('t = 0.0 Myr · 1/3');

  // The rotation curve follows the snapshot on screen, measured from the law's field.
  expect(view.getByRole('radio', { name: 'this snapshot' }).getAttribute('aria-checked')).toBe('true');
  expect(view.getByText(/^At t = 0 Myr, from the law's field/)).toBeTruthy();
  press(view.getByLabelText('Next snapshot'));
  expect(view.getByText(/^At t = 5 Myr, from the law's field/)).toBeTruthy();
  press(view.getByRole('radio', { name: 'end' }));
  expect(view.getByText(/^Measured about the density centre at t = 10 Myr/)).toBeTruthy();
});

test('a page opened mid-run plots the drift from t = 0: the stored samples first, then the live ones', async () => {
  mockApi({
    'GET /api/auth/session': { body: { user: { ...owner, role: 'researcher', email: null }, csrfToken: 't' } },
    [`GET /api/runs/${ID}`]: { body: { ...summary, status: 'running', progress: 0.3, spec, output: null } },
  });
  const { view } = render(<RunView id={ID} />);
  await settle();
  const source = FakeEventSource.instances[0];
  const at = (step: number, energyDrift: number) => ({ percent: step * 5, step, totalSteps: 20, time_Myr: step * 0.5, energyDrift });
  act(() => {
    source.onopen?.();
    source.emit('progress', at(8, 4e-7)); // a live sample can come before the history
    source.emit('history', [at(0, 0), at(2, 1e-7), at(4, 2e-7), at(6, 3e-7)]);
    source.emit('progress', at(10, 5e-7));
  });
  const plot = view.getByTestId('plot-live-drift');
  const line = [...plot.querySelectorAll('path')].find((p) => p.getAttribute('fill') === 'none')!;
  // Steps 2 to 10 in order (the drift of 0 at step 0 has no place on a log axis) ...
  const xs = (line.getAttribute('d') ?? '').split(/[ML]/).filter(Boolean).map((pt: string) => Number(pt.split(',')[0]));
  expect(xs).toHaveLength(5);
  expect(xs).toEqual([...xs].sort((a, b) => a - b));
  // ... on a time axis that starts at t = 0.
  const ticks = [...plot.querySelectorAll('text')].map((t) => t.textContent);
  expect(ticks).toContain('0');
  expect(ticks).toContain('time [Myr]');
  expect(view.getByTestId('live-percent').textContent).toBe('50%');
});

test('a run that is not there says so', async () => {
  mockApi({ 'GET /api/auth/session': { body: { user: null, csrfToken: null } } });
  const { view } = render(<RunView id={ID} />);
  await settle();
  expect(view.getByRole('alert').textContent).toContain('No such run');
});

test('cancelling asks twice, then posts with the CSRF token', async () => {
  const calls = mockApi({
    'GET /api/auth/session': { body: { user: { ...owner, role: 'researcher', email: null }, csrfToken: 'tok-1' } },
    [`GET /api/runs/${ID}`]: { body: { ...summary, status: 'queued', progress: 0, spec, output: null } },
    [`POST /api/runs/${ID}/cancel`]: { status: 202, body: { ...summary, status: 'cancelled', progress: 0 } },
  });
  const { view } = render(<RunView id={ID} />);
  await settle();
  press(view.getByTestId('cancel-run'));
  expect(calls.some((c) => c.method === 'POST')).toBe(false);
  press(view.getByLabelText('Tap again to stop it'));
  await settle();
  const post = calls.find((c) => c.method === 'POST')!;
  expect(post.path).toBe(`/api/runs/${ID}/cancel`);
  expect(post.headers['X-CSRF-Token']).toBe('tok-1');
});

test('a finished run of mine can be carried on by more time, posted with the CSRF token', async () => {
  const calls = mockApi({
    'GET /api/auth/session': { body: { user: { ...owner, role: 'researcher', email: null }, csrfToken: 'tok-2' } },
    [`GET /api/runs/${ID}`]: { body: { ...summary, status: 'finished', progress: 1, spec, output: finishedOutput() } },
    [`GET /api/runs/${ID}/snapshots?format=2`]: { bytes: snapshots },
    [`POST /api/runs/${ID}/extend`]: { status: 202, body: { ...summary, steps: 30, status: 'queued', progress: 20 / 30 } },
  });
  const { view } = render(<RunView id={ID} />);
  await settle();
  // Half the run's own duration is offered first.
  expect(view.getByDisplayValue('5')).toBeTruthy();
  press(view.getByTestId('extend-run'));
  await settle();
  const post = calls.find((c) => c.method === 'POST')!;
  expect(post.path).toBe(`/api/runs/${ID}/extend`);
  expect(post.body).toEqual({ more_Myr: 5 });
  expect(post.headers['X-CSRF-Token']).toBe('tok-2');
});
