import type { RunDetail } from '../../shared/api/contract';
import { SNAPSHOT_FILE } from '../../shared/api/snapshots';
import { RESULT_UNITS } from '../../shared/engine';
import { api } from './api';
import type { EquilibriumRecord } from '../../shared/engine';
import { diagnosticColumns, readOutput, type RunOutputView } from './runOutput';

// Exports of a finished run: the diagnostics series and rotation curves as CSV
// (one header row with units), everything but the frames with the spec as one JSON file,
// and the stored frames as an HDF5 file the server writes.

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
    ...['cm_x_kpc', 'cm_y_kpc', 'cm_z_kpc', 'cm_vx_km_s', 'cm_vy_km_s', 'cm_vz_km_s', 'density_centre_x_kpc', 'density_centre_y_kpc', 'density_centre_z_kpc'],
    'velocities_balanced_for',
    'balanced_for_own_law',
  ];
  const xyz = (v: { x: number; y: number; z: number } | null) => (v ? [v.x, v.y, v.z] : [null, null, null]);
  // The same on every row, so a row read alone still says what the run started from (empty for runs stored before it was recorded).
  const eq = (out.summary as { equilibrium?: EquilibriumRecord } | undefined)?.equilibrium;
  const balanced = eq ? eq.balancedFor.map((b) => `${b.system}: ${b.label}`).join('; ') || 'uploaded velocities' : null;
  const own = eq?.ownLaw == null ? null : String(eq.ownLaw);
  const rows = c.step.map((_, i) =>
    [c.step[i], c.time_Myr[i], c.kineticEnergy[i], c.potentialEnergy[i], c.totalEnergy[i], c.energyDrift[i], c.momentumDrift[i], c.angularMomentumDrift[i], c.virialRatio[i], c.clausiusVirialRatio[i], c.r10_kpc[i], c.r50_kpc[i], c.r90_kpc[i], ...xyz(c.centreOfMass_kpc[i]), ...xyz(c.centreOfMassVelocity_km_s[i]), ...xyz(c.densityCentre_kpc[i]), balanced, own]
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

// What the JSON export holds, written into the file itself (README "Exports" says the same).
const RUN_JSON_CONTENTS = {
  'id, name, status, law, model': 'the run as the API lists it',
  'createdAt, finishedAt': 'ISO 8601 times, UTC',
  spec: 'the run spec, which fully determines the run (same spec and seed, same numbers); units in the field names',
  'output.law': "the force law's label, what it conserves, and its validity notes",
  'output.timescales': 'half-mass radius, rms speed, crossing and relaxation times, suggested timestep of the initial particles; units in the field names',
  'output.warnings': 'checks made before the run: code, severity, message, source',
  'output.diagnostics': 'samples over the run: step, time_Myr, kinetic/potential/total energy, momentum, angular momentum, their relative drifts (no unit), virial ratios (no unit), lagrangianRadii_kpc, toomreQ for disks',
  'output.rotationCurves': 'initial and final curves measured from the particles and the field (radii_kpc, speeds in km/s, particle counts), and the analytic curves of the initial mass model per law',
  'output.summary': 'steps computed, final time in Myr, final and largest drifts, whether the law conserves each quantity, and summary.equilibrium: the law each system\'s velocities were balanced for (balancedFor), whether every one is the run\'s own law (ownLaw) and the Clausius ratio at t = 0 (initialClausiusRatio)',
  'output.snapshotParticles': 'particles kept in each stored frame',
  'output.frames': "the stored frames (frame, step, time_Myr); their positions and velocities are in the run's snapshot file (HDF5), not here",
};

export function runJson(run: RunDetail): string {
  const out = readOutput(run);
  return JSON.stringify(
    {
      format: 'infall-run',
      format_version: 1,
      contents: RUN_JSON_CONTENTS,
      units: { length: 'kpc', velocity: 'km/s', mass: 'Msun', time: 'Myr', ...RESULT_UNITS },
      id: run.id, name: run.name, status: run.status, law: run.lawKind, model: run.modelKind, createdAt: run.createdAt, finishedAt: run.finishedAt, spec: run.spec, output: out,
    },
    null,
    2,
  );
}

export const exportName = (run: RunDetail, what: string, ext: string) => `infall-${run.name.replace(/[^a-z0-9]+/gi, '-').replace(/^-|-$/g, '').toLowerCase() || run.id}-${what}.${ext}`;

/** Saves text or bytes as a file through the browser. */
export function downloadFile(filename: string, mime: string, data: string | Uint8Array<ArrayBuffer>): void {
  if (typeof document === 'undefined') return;
  const url = URL.createObjectURL(new Blob([data], { type: mime }));
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/** Fetches the run's snapshot file from the server (with the API's errors) and saves it. */
export async function downloadSnapshotFile(run: RunDetail): Promise<void> {
  const bytes = await api<Uint8Array<ArrayBuffer>>(`/api/runs/${run.id}/snapshots.h5`, { as: 'bytes' });
  downloadFile(exportName(run, 'snapshots', 'h5'), SNAPSHOT_FILE.mime, bytes);
}
