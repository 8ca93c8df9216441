import { useState } from 'react';
import { colors } from '../../constants/theme';
import { ChoiceChips } from '../fields';
import { formatValue } from '../format';
import { LinePlot, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import type { PlottedRun } from './DiagnosticsPlots';

type When = 'initial' | 'final';

/**
 * Measured rotation curves (mean azimuthal speed of the particles, and circular speed
 * from the law's own field) at the start or end of each run, over the analytic curves.
 */
export function RotationCurvePlot({ runs }: { runs: PlottedRun[] }) {
  const [when, setWhen] = useState<When>('final');
  const single = runs.length === 1;
  const series: PlotSeries[] = [];
  let newtonShown = false;
  for (const r of runs) {
    const measured = r.out.rotationCurves[when];
    const tag = single ? '' : `${r.label} · `;
    series.push({ id: `${r.id}-vphi`, label: `${tag}mean v_φ of particles`, color: r.color, x: measured.radii_kpc, y: measured.meanAzimuthal_km_s });
    series.push({ id: `${r.id}-vc`, label: `${tag}√(R g) from forces`, color: r.color, x: measured.radii_kpc, y: measured.circular_km_s, dashed: true });
    for (const c of r.out.rotationCurves.analytic.curves) {
      const newton = c.law === 'newton';
      if (newton && newtonShown) continue;
      newtonShown ||= newton;
      series.push({
        id: `${r.id}-a-${c.law}`,
        label: `analytic, ${c.label}`,
        color: newton ? colors.textFaint : r.color,
        x: r.out.rotationCurves.analytic.radii_kpc,
        y: c.v_km_s,
        dashed: true,
      });
    }
  }
  const t = runs[0]?.out.rotationCurves[when].time_Myr ?? 0;
  return (
    <Panel
      title="Rotation curve"
      note={`Measured in the plane z = z_cm at t = ${formatValue(t)} Myr; analytic curves are the initial mass model under each law.`}
      right={<ChoiceChips compact value={when} onChange={setWhen} choices={[{ value: 'initial', label: 'start' }, { value: 'final', label: 'end' }]} />}
    >
      <LinePlot series={series} xLabel="radius R [kpc]" yLabel="speed [km/s]" yFromZero accessibilityLabel={`Rotation curves at the ${when === 'initial' ? 'start' : 'end'} of the run`} testID="plot-rotation" />
    </Panel>
  );
}
