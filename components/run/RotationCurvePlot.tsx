import { useState } from 'react';
import { colors, seriesColors } from '../../constants/theme';
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
      // Each bin at its particles' mass-weighted radius (runs stored before that existed: the bin centre).
      series.push({ id: `${r.id}-vphi`, label: `${tag}mean v_φ of particles`, color: r.color, x: measured.meanRadius_kpc ?? measured.radii_kpc, y: measured.meanAzimuthal_km_s });
      (measured.byComponent ?? []).forEach((part, k) =>
        series.push({ id: `${r.id}-vphi-${part.label}`, label: `${tag}mean v_φ, ${part.label}`, color: single ? seriesColors[(k + 2) % seriesColors.length] : r.color, x: part.meanRadius_kpc, y: part.meanAzimuthal_km_s, dashed: !single }),
      );
      series.push({ id: `${r.id}-vc`, label: `${tag}√(R g) from forces`, color: r.color, x: measured.radii_kpc, y: measured.circular_km_s, dashed: true });
    }
    for (const c of r.out.rotationCurves.analytic.curves) {
      const newton = c.law === 'newton';
      if (newton && newtonShown) continue;
      newtonShown ||= newton;
      series.push({ id: `${r.id}-a-${c.law}`, label: `analytic, ${c.label}`, color: newton ? colors.textFaint : r.color, x: r.out.rotationCurves.analytic.radii_kpc, y: c.v_km_s, dashed: true });
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
      : `Measured about the density centre at t = ${formatValue(t)} Myr, from particles within one bin width of its plane (all, and each component on its own); analytic curves are the initial mass model under each law.`;
  return (
    <Panel title="Rotation curve" note={note} right={<ChoiceChips compact value={when} onChange={setChoice} choices={choices} />}>
      <LinePlot series={series} xLabel="radius R [kpc]" yLabel="speed [km/s]" yFromZero accessibilityLabel={`Rotation curves ${when === 'now' ? `at t = ${formatValue(t)} Myr` : `at the ${when === 'initial' ? 'start' : 'end'} of the run`}`} testID="plot-rotation" />
    </Panel>
  );
}
