import { useMemo } from 'react';
import type { ViewStyle } from 'react-native';
import { seriesColors } from '../../constants/theme';
import type { DiagnosticSample } from '../../shared/engine';
import { LinePlot, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import type { PlottedRun } from './DiagnosticsPlots';

const distance = (a: { x: number; y: number; z: number }, b: { x: number; y: number; z: number }) => Math.hypot(a.x - b.x, a.y - b.y, a.z - b.z);

/** Distance each centre has moved since t = 0, kpc, and the centre of mass's speed, km/s. */
export function centreDriftColumns(rows: DiagnosticSample[]) {
  const cm0 = rows[0].centreOfMass, dc0 = rows[0].densityCentre;
  return {
    time_Myr: rows.map((r) => r.time_Myr),
    massCentreMoved_kpc: rows.map((r) => distance(r.centreOfMass, cm0)),
    densityCentreMoved_kpc: rows.map((r) => distance(r.densityCentre, dc0)),
    massCentreSpeed_km_s: rows.map((r) => Math.hypot(r.centreOfMassVelocity.x, r.centreOfMassVelocity.y, r.centreOfMassVelocity.z)),
  };
}

/**
 * Where the system's centres go: an isolated run's centre of mass stays put and
 * keeps its speed, so motion here is self-acceleration (a law's artefact) or an
 * external pull (a rigid halo). Runs stored before these series existed show nothing.
 */
export function CentreDriftPlot({ runs, markerTime, style }: { runs: PlottedRun[]; markerTime?: number; style?: ViewStyle }) {
  const shown = useMemo(() => runs.filter((r) => r.out.diagnostics.length > 0 && r.out.diagnostics[0].centreOfMass), [runs]);
  const single = shown.length === 1;
  const { moved, speed } = useMemo(() => {
    const moved: PlotSeries[] = [];
    const speed: PlotSeries[] = [];
    for (const run of shown) {
      const c = centreDriftColumns(run.out.diagnostics);
      const tag = single ? '' : `${run.label} · `;
      moved.push({ id: `${run.id}-cm`, label: `${tag}centre of mass`, color: single ? seriesColors[0] : run.color, x: c.time_Myr, y: c.massCentreMoved_kpc });
      moved.push({ id: `${run.id}-dc`, label: `${tag}density centre`, color: single ? seriesColors[1] : run.color, x: c.time_Myr, y: c.densityCentreMoved_kpc, dashed: true });
      speed.push({ id: `${run.id}-v`, label: `${tag}centre-of-mass speed`, color: run.color, x: c.time_Myr, y: c.massCentreSpeed_km_s });
    }
    return { moved, speed };
  }, [shown, single]);
  if (shown.length === 0) return null;
  return (
    <Panel style={style} title="Centre drift" note="Distance moved since t = 0 by the centre of mass (solid) and the density centre (dashed), and the centre of mass's speed. Isolated systems under a momentum-conserving law keep both near rounding level.">
      <LinePlot series={moved} xLabel="time [Myr]" yLabel="moved [kpc] (log scale)" yLog markerX={markerTime} accessibilityLabel="Distance moved by the centre of mass and the density centre against time" testID="plot-centre-moved" />
      <LinePlot series={speed} xLabel="time [Myr]" yLabel="speed [km/s] (log scale)" yLog height={160} markerX={markerTime} accessibilityLabel="Centre-of-mass speed against time" testID="plot-centre-speed" />
    </Panel>
  );
}
