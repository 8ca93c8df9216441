import { useState } from 'react';
import { colors } from '../../constants/theme';
import { ChoiceChips } from '../fields';
import { formatValue } from '../format';
import { LinePlot, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import type { PlottedRun } from './DiagnosticsPlots';

type When = 'now' | 'initial' | 'final';

/** The curve at the snapshot on screen, per run id: circular speed from the law's field. */
export type FrameCurves = Record<string, { time_Myr: number; radii_kpc: number[]; circular_km_s: number[] } | null>;

/**
 * Rotation curves over the analytic ones: at the snapshot on screen (circular speed from the
 * law's field of the stored particles), or as measured at the start or end of each run (also
 * the particles' mean azimuthal speed).
 */
export function RotationCurvePlot({ runs, atFrame }: { runs: PlottedRun[]; atFrame?: FrameCurves }) {
  const frameReady = Boolean(atFrame && runs.every((r) => atFrame[r.id]));
  // Until someone picks, follow the snapshot on screen when that can be measured.
  const [choice, setChoice] = useState<When | null>(null);
  const picked = choice ?? (frameReady ? 'now' : 'final');
  const when: When = picked === 'now' && !frameReady ? 'final' : picked;
  const single = runs.length === 1;
  const series: PlotSeries[] = [];
  let newtonShown = false;
  let t = 0;
  for (const r of runs) {
    const tag = single ? '' : `${r.label} · `;
    if (when === 'now') {
      const c = atFrame![r.id]!;
      t = c.time_Myr;
      series.push({ id: `${r.id}-now`, label: `${tag}√(R g) at this snapshot`, color: r.color, x: c.radii_kpc, y: c.circular_km_s });
    } else {
      const measured = r.out.rotationCurves[when];
      t = measured.time_Myr;
      series.push({ id: `${r.id}-vphi`, label: `${tag}mean v_φ of particles`, color: r.color, x: measured.radii_kpc, y: measured.meanAzimuthal_km_s });
      series.push({ id: `${r.id}-vc`, label: `${tag}√(R g) from forces`, color: r.color, x: measured.radii_kpc, y: measured.circular_km_s, dashed: true });
    }
    for (const c of r.out.rotationCurves.analytic.curves) {
      const newton = c.law === 'newton';
      if (newton && newtonShown) continue;
      newtonShown ||= newton;
      // The field form has no closed-form curve: its preview is the algebraic form, so the gap to the
      // curve from forces is the field form's own effect (largest for disks), shown rather than hidden.
      const label = c.law === 'qumond' ? `algebraic form (preview of ${c.label})` : `analytic, ${c.label}`;
      series.push({ id: `${r.id}-a-${c.law}`, label, color: newton ? colors.textFaint : r.color, x: r.out.rotationCurves.analytic.radii_kpc, y: c.v_km_s, dashed: true });
      const measured = when === 'now' ? null : r.out.rotationCurves[when];
      const radii = r.out.rotationCurves.analytic.radii_kpc;
      if (c.law === 'qumond' && measured && measured.radii_kpc.length === radii.length && measured.radii_kpc.every((R, k) => Math.abs(R - radii[k]) <= 1e-9 * R)) {
        series.push({ id: `${r.id}-qumond-gap`, label: `${tag}field form − algebraic form`, color: colors.textMuted, x: radii, y: radii.map((_, k) => measured.circular_km_s[k] - c.v_km_s[k]) });
      }
    }
  }
  const choices = [
    ...(frameReady ? [{ value: 'now' as const, label: 'this snapshot' }] : []),
    { value: 'initial' as const, label: 'start' },
    { value: 'final' as const, label: 'end' },
  ];
  const note =
    when === 'now'
      ? `At t = ${formatValue(t)} Myr, from the law's field of the stored particles (snapshots keep positions only, so no particle speeds here).`
      : `Measured in the plane z = z_cm at t = ${formatValue(t)} Myr; analytic curves are the initial mass model under each law.`;
  return (
    <Panel title="Rotation curve" note={note} right={<ChoiceChips compact value={when} onChange={setChoice} choices={choices} />}>
      <LinePlot series={series} xLabel="radius R [kpc]" yLabel="speed [km/s]" yFromZero accessibilityLabel={`Rotation curves ${when === 'now' ? `at t = ${formatValue(t)} Myr` : `at the ${when === 'initial' ? 'start' : 'end'} of the run`}`} testID="plot-rotation" />
    </Panel>
  );
}
