import type { RunDetail } from '../shared/api/contract';
import type { EquilibriumRecord } from '../shared/engine';
import { diagnosticColumns, readOutput, type RunOutputView } from './runOutput';

// Exports of a finished run: the diagnostics series and rotation curves as CSV
// (one header row with units), and everything with the spec as one JSON file.

const cell = (v: number | string | null | undefined) => (v === null || v === undefined ? '' : typeof v === 'number' ? String(v) : `"${v.replace(/"/g, '""')}"`);

export function diagnosticsCsv(out: RunOutputView): string {
  const c = diagnosticColumns(out.diagnostics);
  const header = [
    'step',
    'time_Myr',
    'kinetic_Msun_km2_s2',
    'potential_Msun_km2_s2',
    'total_Msun_km2_s2',
    'energy_drift',
    'momentum_drift',
    'angular_momentum_drift',
    'virial_ratio',
    'clausius_virial_ratio',
    'r10_kpc',
    'r50_kpc',
    'r90_kpc',
    'velocities_balanced_for',
    'balanced_for_own_law',
  ];
  // The same on every row, so a row read alone still says what the run started from (empty for runs stored before it was recorded).
  const eq = (out.summary as { equilibrium?: EquilibriumRecord }).equilibrium;
  const balanced = eq ? eq.balancedFor.map((b) => `${b.system}: ${b.label}`).join('; ') || 'uploaded velocities' : null;
  const own = eq?.ownLaw == null ? null : String(eq.ownLaw);
  const rows = c.step.map((_, i) =>
    [c.step[i], c.time_Myr[i], c.kineticEnergy[i], c.potentialEnergy[i], c.totalEnergy[i], c.energyDrift[i], c.momentumDrift[i], c.angularMomentumDrift[i], c.virialRatio[i], c.clausiusVirialRatio[i], c.r10_kpc[i], c.r50_kpc[i], c.r90_kpc[i], balanced, own]
      .map(cell)
      .join(','),
  );
  return [header.join(','), ...rows].join('\n') + '\n';
}

export function curvesCsv(out: RunOutputView): string {
  const { initial, final, analytic } = out.rotationCurves;
  const header = ['radius_kpc', 'initial_mean_vphi_km_s', 'initial_circular_km_s', 'final_mean_vphi_km_s', 'final_circular_km_s', ...analytic.curves.map((c) => `analytic_${c.law}_km_s`)];
  const rows = initial.radii_kpc.map((R, k) =>
    [R, initial.meanAzimuthal_km_s[k], initial.circular_km_s[k], final.meanAzimuthal_km_s[k], final.circular_km_s[k], ...analytic.curves.map((c) => (analytic.radii_kpc[k] === R ? c.v_km_s[k] : null))].map(cell).join(','),
  );
  return [header.join(','), ...rows].join('\n') + '\n';
}

export function runJson(run: RunDetail): string {
  const out = readOutput(run);
  return JSON.stringify({ id: run.id, name: run.name, status: run.status, law: run.lawKind, model: run.modelKind, createdAt: run.createdAt, finishedAt: run.finishedAt, spec: run.spec, output: out }, null, 2);
}

export const exportName = (run: RunDetail, what: string, ext: string) => `infall-${run.name.replace(/[^a-z0-9]+/gi, '-').replace(/^-|-$/g, '').toLowerCase() || run.id}-${what}.${ext}`;

/** Saves text as a file through the browser. */
export function downloadText(filename: string, mime: string, text: string): void {
  if (typeof document === 'undefined') return;
  const url = URL.createObjectURL(new Blob([text], { type: mime }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}
