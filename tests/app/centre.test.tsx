import { CentreDriftPlot, centreDriftColumns } from '../../components/run/CentreDriftPlot';
import type { PlottedRun } from '../../components/run/DiagnosticsPlots';
import { diagnosticsCsv } from '../../components/lib/exports';
import type { RunOutputView } from '../../components/lib/runOutput';
import type { DiagnosticSample } from '../../shared/engine';
import { render } from './support/render';

// A centre of mass moving at 3 km/s along x (about 3.07e-3 kpc per Myr) while the density centre sits still.
const row = (k: number) =>
  ({
    step: k,
    time_Myr: 10 * k,
    centreOfMass: { x: 10 * k * 3.0677e-3, y: 0, z: 0 },
    centreOfMassVelocity: { x: 3, y: 0, z: 0 },
    densityCentre: { x: 0, y: 0, z: 0 },
  }) as unknown as DiagnosticSample;

const runWith = (diagnostics: DiagnosticSample[]): PlottedRun => ({ id: 'r', label: 'Emergent (invented)', color: '#fff', out: { diagnostics } as unknown as RunOutputView });

test('the centre series are the distances moved since t = 0 and the speed of the centre of mass', () => {
  const c = centreDriftColumns([row(0), row(1), row(2)]);
  expect(c.massCentreMoved_kpc[2]).toBeCloseTo(0.061354, 6);
  expect(c.densityCentreMoved_kpc).toEqual([0, 0, 0]);
  expect(c.massCentreSpeed_km_s).toEqual([3, 3, 3]);
});

test('the panel plots where the centres went, with units on the axes', () => {
  const { view, container } = render(<CentreDriftPlot runs={[runWith([row(0), row(1), row(2)])]} />);
  expect(view.getByText('Centre drift')).toBeTruthy();
  expect(view.getByText('moved [kpc] (log scale)')).toBeTruthy();
  expect(view.getByText('speed [km/s] (log scale)')).toBeTruthy();
  expect(view.getByLabelText(/^centre of mass, /)).toBeTruthy();
  expect(container.querySelector('[data-testid="plot-centre-speed"]')).toBeTruthy();
});

test('runs stored before the centre series existed show no panel rather than failing', () => {
  const old = { step: 0, time_Myr: 0 } as unknown as DiagnosticSample;
  const { view } = render(<CentreDriftPlot runs={[runWith([old])]} />);
  expect(view.queryByText('Centre drift')).toBeNull();
});

test('the diagnostics CSV carries the centre series, empty for runs stored without them', () => {
  const full = { ...row(1), kineticEnergy: 1, potentialEnergy: null, totalEnergy: null, energyDrift: null, momentumDrift: 0, angularMomentumDrift: 0, virialRatio: null, clausiusVirialRatio: 1, lagrangianRadii_kpc: { r10: 1, r50: 2, r90: 3 } };
  const csv = diagnosticsCsv({ diagnostics: [full, { ...full, centreOfMass: undefined, centreOfMassVelocity: undefined, densityCentre: undefined }] } as unknown as RunOutputView);
  const [header, first, second] = csv.trim().split('\n').map((l) => l.split(','));
  // The centre columns, then the two equilibrium columns (empty here: no summary).
  expect(header.slice(-11, -2)).toEqual(['cm_x_kpc', 'cm_y_kpc', 'cm_z_kpc', 'cm_vx_km_s', 'cm_vy_km_s', 'cm_vz_km_s', 'density_centre_x_kpc', 'density_centre_y_kpc', 'density_centre_z_kpc']);
  expect(first.slice(-11, -2).map(Number)).toEqual([0.030677, 0, 0, 3, 0, 0, 0, 0, 0]);
  expect(second.slice(-11, -2)).toEqual(['', '', '', '', '', '', '', '', '']);
});
