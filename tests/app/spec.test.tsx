import { CompareView } from '../../components/compare/CompareView';
import { compareSpecs } from '../../components/compare/differences';
import { SpecTable } from '../../components/run/SpecTable';
import { parseRunSpec, type RunSpec } from '../../shared/spec';
import { FakeEventSource, mockApi } from './support/api';
import { render, settle } from './support/render';

jest.mock('expo-router', () => require('./support/expoRouter'));

// An invented disk galaxy with a bulge, set up for a halo and run under MOND.
function diskSpec(): RunSpec {
  const parsed = parseRunSpec({
    version: 1,
    name: 'Veyra check (invented)',
    model: { kind: 'disk', n: 8000, mass_Msun: 4e10, scaleLength_kpc: 2.5, scaleHeight_kpc: 0.25, bulge: { mass_Msun: 8e9, scale_kpc: 0.5 }, equilibriumLaw: { kind: 'halo', profile: 'nfw', scale_kpc: 15, density_Msun_kpc3: 8e6 } },
    law: { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 },
    solver: { kind: 'tree', theta: 0.6 },
    timestep_Myr: 0.25,
    duration_Myr: 250,
    softening_kpc: 0.15,
    snapshotEvery: 20,
    seed: 2026,
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return parsed.spec;
}

const text = (container: HTMLElement, key: string) => container.querySelector(`[data-testid="spec-${key}"]`)?.textContent ?? null;
const label = (container: HTMLElement, key: string) => container.querySelector(`[data-testid="spec-${key}"]`)?.getAttribute('aria-label') ?? null;

describe('the spec a run ran', () => {
  it('lists every field with its label and unit, defaults included', () => {
    const { container } = render(<SpecTable columns={[{ title: 'Veyra', color: '#fff', spec: diskSpec() }]} />);
    expect(text(container, 'model.kind')).toBe('ModelExponential disk');
    expect(text(container, 'model.n')).toBe('Particles N8\u2009000');
    expect(text(container, 'model.mass_Msun')).toBe('Mass4e10 M☉');
    expect(text(container, 'model.scaleHeight_kpc')).toBe('Scale height z₀0.25 kpc');
    expect(text(container, 'model.toomreQ')).toBe('Toomre Q1.5'); // the schema's default, filled in
    expect(text(container, 'model.truncationRadius_kpc')).toBe('Truncation radiusthe model’s default');
    expect(text(container, 'model.halo')).toBe('Live halonone'); // an optional part left out, in its schema's words
    expect(text(container, 'model.bulge.mass_Msun')).toBe('Bulge mass8e9 M☉');
    expect(text(container, 'model.equilibriumLaw')).toMatch(/^Velocities balanced for.*\(Halo profile NFW, Scale radius 15 kpc, Density ρ₀ 8e6 M☉\/kpc³\)$/);
    expect(text(container, 'law.interpolation')).toBe('Interpolating functionsimple ν');
    expect(text(container, 'law.a0_m_s2')).toBe('a₀1.2e-10 m/s²');
    expect(text(container, 'integrator')).toBe('IntegratorLeapfrog (KDK)');
    expect(text(container, 'solver.kind')).toBe('Force solverBarnes–Hut tree');
    expect(text(container, 'solver.theta')).toBe('Opening angle θ0.6');
    expect(text(container, 'timestep_Myr')).toBe('Timestep Δt0.25 Myr');
    expect(text(container, 'duration_Myr')).toBe('Duration250 Myr');
    expect(text(container, 'softening_kpc')).toBe('Softening ε0.15 kpc');
    expect(text(container, 'snapshotEvery')).toBe('Snapshot every20 steps');
    expect(text(container, 'diagnosticsEvery')).toBe('Diagnostics everydefault, about 200 samples');
    expect(text(container, 'seed')).toBe('Random seed2026');
    expect(container.textContent).not.toContain('≠');
  });

  it('lists both systems of an encounter under their own names', () => {
    const parsed = parseRunSpec({
      version: 1,
      model: { kind: 'encounter', primary: { kind: 'plummer', n: 600, mass_Msun: 2e10, scale_kpc: 1.5 }, secondary: { kind: 'disk', n: 300, mass_Msun: 1e10, scaleLength_kpc: 1, scaleHeight_kpc: 0.1 }, pericentre_kpc: 8, initialSeparation_kpc: 40, secondaryTilt_deg: 30 },
      law: { kind: 'newton' },
      timestep_Myr: 0.5,
      duration_Myr: 100,
      softening_kpc: 0.1,
      snapshotEvery: 10,
    });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
    const { container } = render(<SpecTable columns={[{ title: 'Encounter', color: '#fff', spec: parsed.spec }]} />);
    expect(text(container, 'model.kind')).toBe('ModelEncounter');
    expect(text(container, 'model.primary.kind')).toBe('PrimaryPlummer sphere');
    expect(text(container, 'model.primary.n')).toBe('Primary · Particles N600');
    expect(text(container, 'model.primary.truncationRadius_kpc')).toBe('Primary · Truncation radiusthe model’s default');
    expect(text(container, 'model.secondary.kind')).toBe('SecondaryExponential disk');
    expect(text(container, 'model.secondary.equilibriumLaw')).toBe('Secondary · Velocities balanced forthe run’s law');
    // A version-1 sphere that named no law was balanced for the reference law.
    expect(text(container, 'model.primary.equilibriumLaw')).toBe('Primary · Velocities balanced forNewtonian (a version 1 spec)');
    // Its disk was drawn from Gaussians about moments, as every disk before version 3.
    expect(text(container, 'model.secondary.setUp')).toBe("Secondary · Velocitiesin-plane velocities as Gaussians about moments, Toomre's Q with Newton's G (a version 1 spec)");
    expect(text(container, 'model.primary.setUp')).toBeNull();
    expect(text(container, 'model.secondaryTilt_deg')).toBe('Secondary tilt30°');
    expect(text(container, 'model.primaryTilt_deg')).toBe('Primary tilt0°');
  });

  it('a disk of an older spec says how its velocities were drawn; a current one needs no such row', () => {
    const older = render(<SpecTable columns={[{ title: 'Veyra', color: '#fff', spec: diskSpec() }]} />);
    expect(text(older.container, 'model.setUp')).toBe("Velocitiesin-plane velocities as Gaussians about moments, Toomre's Q with Newton's G (a version 1 spec)");
    const current = render(<SpecTable columns={[{ title: 'Veyra', color: '#fff', spec: { ...diskSpec(), version: 3 } }]} />);
    expect(text(current.container, 'model.kind')).toBe('ModelExponential disk');
    expect(text(current.container, 'model.setUp')).toBeNull();
  });

  it('says "1 step", not "1 steps"', () => {
    const { container } = render(<SpecTable columns={[{ title: 'Veyra', color: '#fff', spec: { ...diskSpec(), snapshotEvery: 1, diagnosticsEvery: 2 } }]} />);
    expect(text(container, 'snapshotEvery')).toBe('Snapshot every1 step');
    expect(text(container, 'diagnosticsEvery')).toBe('Diagnostics every2 steps');
  });

  it('marks exactly the fields where two specs differ, and says how many', () => {
    const a = diskSpec();
    const b: RunSpec = { ...a, law: { kind: 'halo', profile: 'nfw', scale_kpc: 15, density_Msun_kpc3: 8e6 }, softening_kpc: 0.1 };
    const differing = compareSpecs(a, b).filter((l) => l.differs).map((l) => l.key);
    // The law's kind, MOND's own two parameters against the halo's three, and the softening.
    expect(differing.sort()).toEqual(['law.a0_m_s2', 'law.density_Msun_kpc3', 'law.interpolation', 'law.kind', 'law.profile', 'law.scale_kpc', 'softening_kpc'].sort());

    const { container, view } = render(<SpecTable columns={[{ title: 'MOND', color: '#f90', spec: a }, { title: 'Newton + halo', color: '#9bf', spec: b }]} />);
    expect(view.getByText('7 fields differ (marked ≠); every other field is the same.')).toBeTruthy();
    expect(label(container, 'softening_kpc')).toBe('Softening ε: MOND 0.15 kpc; Newton + halo 0.1 kpc; differs');
    expect(label(container, 'law.profile')).toBe('Halo profile: MOND not set; Newton + halo NFW; differs');
    expect(label(container, 'model.n')).toBe('Particles N: MOND 8\u2009000; Newton + halo 8\u2009000');
    expect(container.querySelectorAll('[aria-label$="; differs"]')).toHaveLength(7);
  });
});

describe('the compare page', () => {
  const owner = { id: 7, login: 'teodora-vance', name: 'Teodora Vance' };
  const ids = ['11111111-2222-4333-8444-555555555555', '11111111-2222-4333-8444-666666666666'];

  beforeEach(() => {
    FakeEventSource.instances = [];
    (globalThis as { EventSource?: unknown }).EventSource = FakeEventSource;
  });

  it('shows both specs with the law marked as the difference, and live cards that name their law', async () => {
    const a = diskSpec();
    const b: RunSpec = { ...a, law: { kind: 'newton' } };
    const run = (id: string, spec: RunSpec, lawKind: string) => ({ id, name: `Veyra check (invented) · ${lawKind}`, status: 'running', progress: 0.3, modelKind: 'disk', lawKind, particles: 8000, steps: 1000, costInteractions: 1, pairId: 'p1', error: null, createdAt: new Date().toISOString(), startedAt: null, finishedAt: null, owner, spec, output: null });
    mockApi({
      'GET /api/auth/me': { body: { user: { ...owner, role: 'researcher', email: null }, csrfToken: 't' } },
      [`GET /api/runs/${ids[0]}`]: { body: run(ids[0], b, 'newton') },
      [`GET /api/runs/${ids[1]}`]: { body: run(ids[1], a, 'mond') },
    });
    const { container, view } = render(<CompareView a={ids[0]} b={ids[1]} />);
    await settle();
    // The law and MOND's two parameters: everything else is shared.
    expect(view.getByText('3 fields differ (marked ≠); every other field is the same.')).toBeTruthy();
    expect(label(container, 'law.kind')).toMatch(/^Law: Newton Newtonian; MOND \(algebraic\) MOND.*; differs$/);
    expect(view.getByText('Integrating · Newton')).toBeTruthy();
    expect(view.getByText('Integrating · MOND (algebraic)')).toBeTruthy();
  });
});
