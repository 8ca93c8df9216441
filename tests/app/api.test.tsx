import { api, ApiError, setCsrfToken } from '../../components/lib/api';
import { describeDifferences } from '../../components/compare/differences';
import { groupPairs } from '../../components/compare/ComparePicker';
import { refusals } from '../../components/launch/CostPanel';
import { formatBound, formatInput } from '../../components/format';
import { mockApi } from './support/api';

jest.mock('expo-router', () => require('./support/expoRouter'));

describe('the API client', () => {
  it('turns an error body into an ApiError with code, message and field', async () => {
    mockApi({ 'POST /api/runs': { status: 400, body: { error: { code: 'INVALID_SPEC', message: 'spec.model.n: too small', field: 'spec.model.n' } } } });
    const err = await api('/api/runs', { method: 'POST', body: {} }).catch((e) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({ status: 400, code: 'INVALID_SPEC', message: 'spec.model.n: too small', field: 'spec.model.n' });
  });

  it('fetches a fresh CSRF token once when the server rejects the old one', async () => {
    setCsrfToken('stale');
    let tries = 0;
    const calls = mockApi({
      'POST /api/tokens': (c) => (c.headers['X-CSRF-Token'] === 'fresh' ? { status: 201, body: { ok: true } } : (tries++, { status: 403, body: { error: { code: 'CSRF_REJECTED', message: 'bad token' } } })),
      'GET /api/auth/session': { body: { user: { id: 1 }, csrfToken: 'fresh' } },
    });
    await expect(api('/api/tokens', { method: 'POST', body: { name: 'x' } })).resolves.toEqual({ ok: true });
    expect(tries).toBe(1);
    expect(calls.map((c) => c.method + ' ' + c.path)).toEqual(['POST /api/tokens', 'GET /api/auth/session', 'POST /api/tokens']);
  });

  it('reports an unreachable server as a network error', async () => {
    global.fetch = jest.fn(async () => {
      throw new TypeError('Failed to fetch');
    }) as unknown as typeof fetch;
    await expect(api('/api/runs')).rejects.toMatchObject({ code: 'NETWORK' });
  });
});

describe('quota refusals before submitting', () => {
  const usage = {
    limits: { maxParticles: 1000, maxSteps: 500, maxConcurrentRuns: 2, dailyInteractions: 1e9, maxUploadBytes: 256 * 1024, maxUploadRows: 2000 },
    used: { interactionsToday: 9e8, activeRuns: 1 },
    remaining: { interactionsToday: 1e8, concurrentRuns: 1 },
    day: '2026-12-01',
    resetsAt: '2026-12-02T00:00:00Z',
  };
  it('names every limit the run would break', () => {
    const r = refusals({ particles: 2000, steps: 400, interactions: 5e8, runs: 2 }, usage);
    expect(r).toHaveLength(3);
    expect(r).toEqual([
      'This run has 2\u2009000 particles; your limit is 1\u2009000 particles per run.',
      'These 2 runs need 2 run slots; 1 of your 2 is free. Wait for a run to end, or cancel one.',
      'These 2 runs need 5e8 pair interactions; 1e8 of your 1e9 are left today. The budget resets at 00:00 UTC.',
    ]);
  });
  it('finds nothing to refuse within the budget', () => {
    expect(refusals({ particles: 500, steps: 400, interactions: 1e7, runs: 1 }, usage)).toEqual([]);
  });
});

describe('numbers as typed and as limits', () => {
  it('keeps big masses and tiny accelerations readable', () => {
    expect(formatInput(1e10)).toBe('1e10');
    expect(formatInput(1.2e-10)).toBe('1.2e-10');
    expect(formatInput(0.05)).toBe('0.05');
    expect(formatBound(100000)).toBe('100\u2009000');
    expect(formatBound(1e15)).toBe('1e15');
    // The seed's upper limit, exactly: a rounded 4.294967e9 would read as refusing 4294967295.
    expect(formatBound(4_294_967_295)).toBe('4\u2009294\u2009967\u2009295');
  });
});

describe('the compare summary', () => {
  const out = (over: { hasPotential: boolean; maxDrift: number | null; r50: [number, number]; label: string; kind?: string }) =>
    ({
      law: { kind: over.kind ?? 'x', label: over.label, hasPotential: over.hasPotential, conservesMomentum: over.hasPotential, conservesEnergy: over.hasPotential, conservesAngularMomentum: true, validity: '', notes: '' },
      summary: { maxAbsEnergyDrift: over.maxDrift, finalMomentumDrift: 1e-16 },
      diagnostics: over.r50.map((r50) => ({ lagrangianRadii_kpc: { r10: 0, r50, r90: 0 }, virialRatio: 1, clausiusVirialRatio: 1.1 })),
      rotationCurves: { final: { radii_kpc: [1, 2], circular_km_s: [100, 120], particleCounts: [5, 5] } },
    }) as never;

  it('compares drifts, structure and outer speeds in sentences', () => {
    const lines = describeDifferences({ label: 'Newton', out: out({ hasPotential: true, maxDrift: 1e-6, r50: [1, 1.1], label: 'Newtonian' }) }, { label: 'Yukawa', out: out({ hasPotential: true, maxDrift: 1e-4, r50: [1, 0.8], label: 'Yukawa' }) });
    expect(lines[0]).toBe('Largest energy drift |ΔE|/(K₀ + |W₀|): 1.00e-6 under Newton, 1.00e-4 under Yukawa (Yukawa is 100× worse).');
    expect(lines).toContain('Half-mass radius changed +10% under Newton and -20% under Yukawa.');
    expect(lines).toContain('Outermost circular speed at the end: 120 km/s at 2 kpc under Newton, 120 km/s at 2 kpc under Yukawa.');
  });

  it('says when energy cannot be compared', () => {
    const lines = describeDifferences({ label: 'Newton', out: out({ hasPotential: true, maxDrift: 1e-6, r50: [1, 1], label: 'N' }) }, { label: 'MOND', out: out({ hasPotential: false, maxDrift: null, r50: [1, 1], label: 'M' }) });
    expect(lines[0]).toMatch(/^MOND has no potential energy/);
    expect(lines[1]).toMatch(/under MOND \(not conserved by this law\)/);
  });

  it('judges equilibrium by 2K/|W| only under softened Newton, by the Clausius ratio otherwise', () => {
    // Common practice: the scalar virial theorem 2K + W = 0 holds for a 1/r pair potential;
    // an external halo or a Yukawa term needs the Clausius form 2K = -Σ m r·a.
    const lines = describeDifferences(
      { label: 'Newton', out: out({ hasPotential: true, maxDrift: 1e-6, r50: [1, 1], label: 'N', kind: 'newton' }) },
      { label: 'Halo', out: out({ hasPotential: true, maxDrift: 1e-6, r50: [1, 1], label: 'H', kind: 'halo' }) },
    );
    expect(lines).toContain('Final virial ratio: 1 under Newton, 1.1 under Halo (1 is equilibrium).');
  });

  it('groups runs into pairs of two', () => {
    const r = (id: string, pairId: string | null) => ({ id, pairId }) as never;
    expect(groupPairs([r('a', 'p'), r('b', 'p'), r('c', null), r('d', 'q')])).toEqual([{ id: 'p', runs: [r('a', 'p'), r('b', 'p')] }]);
  });
});
