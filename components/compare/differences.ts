import { readsPotentialVirial, type RunOutputView } from '../lib/runOutput';
import type { RunSpec } from '../../shared/spec';
import { formatValue } from '../format';
import { rowText, SPEC_GROUPS, specRows, type SpecGroup, type SpecRow } from '../spec/rows';

// The short written comparison of two runs: plain sentences from their outputs.

export interface Side {
  label: string;
  out: RunOutputView;
}

function outerSpeed(out: RunOutputView): { R: number; v: number } | null {
  const c = out.rotationCurves.final;
  for (let k = c.radii_kpc.length - 1; k >= 0; k--) {
    if (c.circular_km_s[k] > 0 && c.particleCounts[k] > 0) return { R: c.radii_kpc[k], v: c.circular_km_s[k] };
  }
  return null;
}

function halfMassChange(out: RunOutputView): number | null {
  const d = out.diagnostics;
  if (d.length < 2) return null;
  const r0 = d[0].lagrangianRadii_kpc.r50;
  return r0 > 0 ? d[d.length - 1].lagrangianRadii_kpc.r50 / r0 - 1 : null;
}

const pct = (x: number) => `${x >= 0 ? '+' : ''}${formatValue(x * 100, 2)}%`;

export function describeDifferences(a: Side, b: Side): string[] {
  const lines: string[] = [];
  const ea = a.out.summary.maxAbsEnergyDrift;
  const eb = b.out.summary.maxAbsEnergyDrift;
  if (ea !== null && eb !== null) {
    const worse = ea > eb ? a : b;
    const ratio = Math.max(ea, eb) / Math.max(1e-300, Math.min(ea, eb));
    lines.push(`Largest energy drift |ΔE|/(K₀ + |W₀|): ${formatValue(ea)} under ${a.label}, ${formatValue(eb)} under ${b.label}${ratio > 3 ? ` (${worse.label} is ${formatValue(ratio, 2)}× worse)` : ''}.`);
  } else {
    const without = [a, b].filter((s) => !s.out.law.hasPotential).map((s) => s.label);
    lines.push(`${without.join(' and ')} ${without.length > 1 ? 'have' : 'has'} no potential energy, so energy conservation cannot be compared; compare structure and rotation curves instead (momentum too where the law conserves it).`);
  }
  const ma = a.out.summary.finalMomentumDrift;
  const mb = b.out.summary.finalMomentumDrift;
  lines.push(`Final momentum drift: ${formatValue(ma)} under ${a.label}${a.out.law.conservesMomentum ? '' : ' (not conserved by this law)'}, ${formatValue(mb)} under ${b.label}${b.out.law.conservesMomentum ? '' : ' (not conserved by this law)'}.`);
  const ha = halfMassChange(a.out);
  const hb = halfMassChange(b.out);
  if (ha !== null && hb !== null) lines.push(`Half-mass radius changed ${pct(ha)} under ${a.label} and ${pct(hb)} under ${b.label}.`);
  const va = outerSpeed(a.out);
  const vb = outerSpeed(b.out);
  if (va && vb) lines.push(`Outermost circular speed at the end: ${formatValue(va.v)} km/s at ${formatValue(va.R)} kpc under ${a.label}, ${formatValue(vb.v)} km/s at ${formatValue(vb.R)} kpc under ${b.label}.`);
  const qa = a.out.diagnostics[a.out.diagnostics.length - 1];
  const qb = b.out.diagnostics[b.out.diagnostics.length - 1];
  if (qa && qb) {
    const vr = (s: Side, q: typeof qa) => (readsPotentialVirial(s.out.law) ? q.virialRatio : q.clausiusVirialRatio);
    lines.push(`Final virial ratio: ${formatValue(vr(a, qa))} under ${a.label}, ${formatValue(vr(b, qb))} under ${b.label} (1 is equilibrium).`);
  }
  return lines;
}

/** One field of two specs side by side; a field only one spec has is null on the other side. */
export interface SpecLine {
  key: string;
  group: SpecGroup;
  label: string;
  a: string | null;
  b: string | null;
  differs: boolean;
}

const shown = (r: SpecRow | undefined) => (r ? rowText(r) : null);

/** Two specs field by field, grouped, in the first spec's order (fields only the second has end their group). */
export function compareSpecs(a: RunSpec, b: RunSpec): SpecLine[] {
  const rowsA = specRows(a);
  const rowsB = specRows(b);
  const inA = new Map(rowsA.map((r) => [r.key, r]));
  const inB = new Map(rowsB.map((r) => [r.key, r]));
  return SPEC_GROUPS.flatMap((group) =>
    [...rowsA.filter((r) => r.group === group), ...rowsB.filter((r) => r.group === group && !inA.has(r.key))].map((r) => {
      const va = shown(inA.get(r.key));
      const vb = shown(inB.get(r.key));
      return { key: r.key, group, label: r.label, a: va, b: vb, differs: va !== vb };
    }),
  );
}
