// The rotation-curve panel of a run built from a galaxy: the galaxy's observed curve with its
// 1 sigma error bars is drawn beside the run's, at the snapshot on screen as at start and end;
// a galaxy the viewer may not see (404) leaves the panel as it was.
import { RotationCurvePlot } from '../../components/run/RotationCurvePlot';
import type { PlottedRun } from '../../components/run/DiagnosticsPlots';
import type { RunOutputView } from '../../components/lib/runOutput';
import { mockApi } from './support/api';
import { press, render, settle } from './support/render';

const curve = (time_Myr: number, v: number) => ({ step: 0, time_Myr, radii_kpc: [1, 2, 3], meanAzimuthal_km_s: [v - 20, v - 10, v - 5], particleCounts: [10, 10, 10], circular_km_s: [v, v + 5, v + 8] });
const output = {
  law: { kind: 'halo', label: 'Newtonian + NFW halo', hasPotential: true },
  rotationCurves: { initial: curve(0, 120), final: curve(100, 120), analytic: { radii_kpc: [1, 2, 3], curves: [{ law: 'halo', label: 'Newtonian + NFW halo', v_km_s: [120, 122, 123] }] } },
} as unknown as RunOutputView;
const run = (galaxyId: number | null): PlottedRun => ({ id: 'r', label: 'Halo', color: '#6cc', out: output, galaxyId });
const atFrame = { r: { time_Myr: 40, radii_kpc: [1, 2, 3], circular_km_s: [118, 124, 127] } };
const galaxy = { id: 5, name: 'Invented spiral', curve: { radiusKpc: [0.5, 1.5, 2.5], vObs: [80, 115, 126], vErr: [6, 4, 3], vGas: null, vDisk: null, vBulge: null }, fits: [] };

/** Error-bar paths: a vertical stroke and two 6-px caps per point. */
const barsOf = (container: HTMLElement) => [...container.querySelectorAll('path')].filter((p) => /V[-\d.]+M[-\d.]+,[-\d.]+h6/.test(p.getAttribute('d') ?? ''));

test('the observed curve with error bars is overlaid at the snapshot on screen and at the end', async () => {
  const calls = mockApi({ 'GET /api/galaxies/5': { body: galaxy } });
  const { container, view } = render(<RotationCurvePlot runs={[run(5)]} atFrame={atFrame} />);
  await settle();
  expect(calls.map((c) => c.path)).toEqual(['/api/galaxies/5']);
  expect(view.getByRole('group', { name: 'observed galaxy (±1σ)' })).toBeTruthy();
  const entry = view.getByRole('button', { name: 'observed, points with round marks with error bars' });
  expect(view.getByText(/Observed points: Invented spiral, with 1σ error bars\./)).toBeTruthy();
  expect(entry.getAttribute('aria-pressed')).toBe('true');
  expect(barsOf(container)).toHaveLength(1);
  // Three points: three vertical bars, each 2 sigma tall on the plot (caps at v ± error).
  expect(barsOf(container)[0].getAttribute('d')!.match(/V/g)).toHaveLength(3);
  press(view.getByRole('radio', { name: 'end' }));
  expect(barsOf(container)).toHaveLength(1);
});

test('no galaxy, or one the viewer may not see: no overlay', async () => {
  const calls = mockApi({ 'GET /api/galaxies/6': { status: 404, body: { error: { code: 'NOT_FOUND', message: 'No galaxy 6' } } } });
  const hidden = render(<RotationCurvePlot runs={[run(6)]} atFrame={atFrame} />);
  await settle();
  expect(hidden.view.queryByRole('group', { name: 'observed galaxy (±1σ)' })).toBeNull();
  expect(barsOf(hidden.container)).toHaveLength(0);
  const plain = render(<RotationCurvePlot runs={[run(null)]} atFrame={atFrame} />);
  await settle();
  expect(plain.view.queryByRole('group', { name: 'observed galaxy (±1σ)' })).toBeNull();
  expect(calls.map((c) => c.path)).toEqual(['/api/galaxies/6']);
});
