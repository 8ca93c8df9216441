import { SetupVsLaw } from '../../components/compare/SetupVsLaw';
import type { SetupSide } from '../../components/compare/setupVsLaw';
import type { RunOutputView } from '../../components/lib/runOutput';
import { diagnosticsCsv } from '../../components/lib/exports';
import { render } from './support/render';

const lawInfo = (kind: string, label: string, hasPotential: boolean) => ({ kind, label, conservesEnergy: hasPotential, conservesMomentum: hasPotential, conservesAngularMomentum: hasPotential, hasPotential, validity: 'v', notes: 'n' });
const row = (k: number, r50: number, q: number) => ({ step: k, time_Myr: k, kineticEnergy: 1, potentialEnergy: -2, totalEnergy: -1, energyDrift: k * 1e-6, momentum: { x: 0, y: 0, z: 0 }, momentumDrift: 0, angularMomentum: { x: 0, y: 0, z: 0 }, angularMomentumDrift: 0, virialRatio: 1, clausiusVirialRatio: q, lagrangianRadii_kpc: { r10: 0.5, r50, r90: 3 }, toomreQ: null });
const curve = { step: 0, time_Myr: 0, radii_kpc: [1], meanAzimuthal_km_s: [0], particleCounts: [5], circular_km_s: [60] };

function output(kind: string, label: string, hasPotential: boolean, equilibrium: unknown, q0: number): RunOutputView {
  return {
    law: lawInfo(kind, label, hasPotential),
    diagnostics: [row(0, 1.3, q0), row(10, kind === 'newton' ? 1.31 : 1.1, 1)],
    rotationCurves: { initial: curve, final: curve, analytic: { radii_kpc: [1], curves: [] } },
    summary: { maxAbsEnergyDrift: hasPotential ? 1e-5 : null, finalMomentumDrift: 1e-15, ...(equilibrium ? { equilibrium } : {}) },
  } as unknown as RunOutputView;
}

const model = { kind: 'plummer', n: 2000, mass_Msun: 1e10, scale_kpc: 2 };
const spec = (law: unknown, extra: Record<string, unknown> = {}) => ({ version: 2, model, law, timestep_Myr: 0.5, duration_Myr: 100, softening_kpc: 0.1, snapshotEvery: 10, seed: 1, ...extra });
const newtonRec = (q: number) => ({ balancedFor: [{ system: 'plummer', law: 'newton', label: 'Newtonian', ownLaw: true }], ownLaw: true, initialClausiusRatio: q });

const newtonSide: SetupSide = { label: 'Newton', spec: spec({ kind: 'newton' }), out: output('newton', 'Newtonian', true, newtonRec(1.004), 1.004) };

function texts(container: HTMLElement, label: string): string[] {
  const block = container.querySelector(`[aria-label="${label}"]`);
  return Array.from(block?.querySelectorAll('div[dir="auto"], span') ?? []).map((n) => n.textContent ?? '');
}

test('a pair whose MOND run was balanced for Newton says so first, then separates set-up from law', () => {
  const mond: SetupSide = {
    label: 'MOND',
    spec: spec({ kind: 'mond' }, { model: { ...model, equilibriumLaw: { kind: 'newton' } } }),
    out: output('mond', 'MOND (simple ν)', false, { balancedFor: [{ system: 'plummer', law: 'newton', label: 'Newtonian', ownLaw: false }], ownLaw: false, initialClausiusRatio: 0.77 }, 0.77),
  };
  const { container, view } = render(<SetupVsLaw a={newtonSide} b={mond} />);
  const all = container.textContent ?? '';
  const caution = view.getByText(/MOND was not balanced for its own law/);
  expect(caution.textContent).toContain('plummer for Newtonian');
  expect(caution.textContent).toContain('Clausius ratio 0.770');
  // The caution comes before both sections.
  expect(all.indexOf('not balanced for its own law')).toBeLessThan(all.indexOf('Set-up'));
  expect(all.indexOf('Set-up')).toBeLessThan(all.indexOf('Law'));
  expect(view.getByText(/Same model and seed: identical initial positions/)).toBeTruthy();
  expect(view.getByText(/Velocities of both runs balanced for Newtonian: the initial particles are identical/)).toBeTruthy();
  expect(view.getByText(/1\.004 \(Newton\), 0\.770 \(MOND\)/)).toBeTruthy();
  expect(view.getByText(/mix the set-up with the laws/)).toBeTruthy();
  expect(view.getByText(/Half-mass radius changed/)).toBeTruthy();
  expect(texts(container, 'Set-up').join(' ')).not.toContain('Half-mass');
});

test('a pair balanced each for its own law from the same positions credits the differences to the laws', () => {
  const mond: SetupSide = {
    label: 'MOND',
    spec: spec({ kind: 'mond' }),
    out: output('mond', 'MOND (simple ν)', false, { balancedFor: [{ system: 'plummer', law: 'mond', label: 'MOND (simple ν)', ownLaw: true }], ownLaw: true, initialClausiusRatio: 0.996 }, 0.996),
  };
  const { view, container } = render(<SetupVsLaw a={newtonSide} b={mond} />);
  expect(view.queryByLabelText('Caution')).toBeNull();
  expect(view.getByText(/Velocities balanced for Newtonian \(Newton\) and for MOND \(simple ν\) \(MOND\)/)).toBeTruthy();
  expect(view.getByText(/come from the laws, up to integration error and particle noise/)).toBeTruthy();
  expect(container.textContent).not.toContain('Other settings differ');
});

test('different settings are set-up differences, and a run stored before the record existed is flagged', () => {
  const old: SetupSide = { label: 'Newton, old', spec: spec({ kind: 'newton' }, { version: 1, softening_kpc: 0.2, model: { ...model, n: 3000 } }), out: output('newton', 'Newtonian', true, null, 1.02) };
  const { view } = render(<SetupVsLaw a={newtonSide} b={old} />);
  expect(view.getByText(/stored before Infall recorded what its velocities were balanced for/)).toBeTruthy();
  expect(view.getByText(/Different initial positions: model.n 2000 vs 3000/)).toBeTruthy();
  expect(view.getByText(/Other settings differ: softening_kpc 0.1 vs 0.2; version 2 vs 1/)).toBeTruthy();
});

test('the diagnostics CSV carries what the velocities were balanced for on every row (empty for a run stored before the record)', () => {
  const mond = output('mond', 'MOND (simple ν)', false, { balancedFor: [{ system: 'plummer', law: 'newton', label: 'Newtonian', ownLaw: false }], ownLaw: false, initialClausiusRatio: 0.77 }, 0.77);
  const [header, ...rows] = diagnosticsCsv(mond).trim().split('\n');
  expect(header.split(',').slice(-2)).toEqual(['velocities_balanced_for', 'balanced_for_own_law']);
  for (const r of rows) expect(r.endsWith(',"plummer: Newtonian","false"')).toBe(true);
  const [, first] = diagnosticsCsv(output('newton', 'Newtonian', true, null, 1)).trim().split('\n');
  expect(first.endsWith(',,')).toBe(true);
});
