import { useMemo, useState } from 'react';
import { StyleSheet, View, useWindowDimensions } from 'react-native';
import { seriesColors, space, WIDE_BREAKPOINT } from '../../constants/theme';
import { diagnosticColumns, magnitude, readsPotentialVirial, type RunOutputView } from '../lib/runOutput';
import { ChoiceChips } from '../fields';
import { LinePlot, type PlotMark, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import { CentreDriftPlot } from './CentreDriftPlot';

export interface PlottedRun {
  id: string;
  label: string;
  color: string;
  out: RunOutputView;
  /** The galaxy the run was built from: its observed curve is drawn beside the run's. */
  galaxyId?: number | null;
}

type DriftScale = 'log' | 'signed';

const RADIUS_MARKS: PlotMark[] = ['triangle', 'circle', 'square'];

/** Energy, momentum, structure and virial plots for one run, or several overlaid. */
export function DiagnosticsPlots({ runs, markerTime, columns }: { runs: PlottedRun[]; markerTime?: number; columns?: 1 | 2 }) {
  const [driftScale, setDriftScale] = useState<DriftScale>('log');
  const { width } = useWindowDimensions();
  const twoUp = (columns ?? (width >= WIDE_BREAKPOINT ? 2 : 1)) === 2;
  const single = runs.length === 1;

  const data = useMemo(() => runs.map((r) => ({ run: r, c: diagnosticColumns(r.out.diagnostics) })), [runs]);

  // Series are built once per data and scale, so a moving marker redraws nothing but itself.
  const { energy, momentum, radii, virial } = useMemo(() => {
    const energy: PlotSeries[] = data.filter((d) => d.run.out.law.hasPotential).map(({ run, c }) => ({
      id: run.id,
      label: single ? 'ΔE / (K₀ + |W₀|)' : run.label,
      color: run.color,
      x: c.time_Myr,
      y: driftScale === 'log' ? magnitude(c.energyDrift) : c.energyDrift,
    }));

    const momentum: PlotSeries[] = data.flatMap(({ run, c }) => [
      { id: `${run.id}-p`, label: single ? 'momentum |ΔP| / Σm|v|' : `${run.label} · momentum`, color: single ? seriesColors[0] : run.color, x: c.time_Myr, y: c.momentumDrift, mark: 'circle' as const, group: single ? undefined : run.label },
      { id: `${run.id}-l`, label: single ? 'angular momentum |ΔL| / Σm|r×v|' : `${run.label} · angular momentum`, color: single ? seriesColors[1] : run.color, x: c.time_Myr, y: c.angularMomentumDrift, dashed: true, mark: 'square' as const, group: single ? undefined : run.label },
    ]);

    const radii: PlotSeries[] = data.flatMap(({ run, c }) =>
      (['r10_kpc', 'r50_kpc', 'r90_kpc'] as const).map((key, k) => ({
        id: `${run.id}-${key}`,
        label: single ? `${[10, 50, 90][k]}% mass` : `${run.label} · ${[10, 50, 90][k]}%`,
        color: single ? seriesColors[k] : run.color,
        x: c.time_Myr,
        y: c[key],
        dashed: !single && key !== 'r50_kpc',
        mark: RADIUS_MARKS[k],
        group: single ? undefined : run.label,
      })),
    );

    const virial: PlotSeries[] = data.map(({ run, c }) => {
      const own = readsPotentialVirial(run.out.law);
      return {
        id: `${run.id}-v`,
        label: `${single ? '' : `${run.label} · `}${own ? '2K / |W|' : '2K / |Σ m r·a| (Clausius)'}`,
        color: run.color,
        x: c.time_Myr,
        y: own ? c.virialRatio : c.clausiusVirialRatio,
      };
    });
    return { energy, momentum, radii, virial };
  }, [data, driftScale, single]);

  const noEnergy = runs.filter((r) => !r.out.law.hasPotential).map((r) => r.out.law.label);

  return (
    <View style={[styles.grid, twoUp && styles.gridWide]}>
      <Panel
        style={twoUp ? styles.half : undefined}
        title="Energy drift"
        note={noEnergy.length ? `${noEnergy.join(', ')}: no potential, so no energy to track.` : 'Change of total energy since t = 0, over K₀ + |W₀| (kinetic plus the particles\' own potential energy at t = 0; a rigid halo\'s term is left out, so its zero point does not matter).'}
        right={energy.length === 0 ? undefined : <ChoiceChips compact value={driftScale} onChange={setDriftScale} choices={[{ value: 'log', label: 'log |ΔE|' }, { value: 'signed', label: 'signed' }]} />}
      >
        {energy.length === 0 ? null : (
          <LinePlot
            series={energy}
            xLabel="time [Myr]"
            yLabel={driftScale === 'log' ? '|ΔE| / (K₀ + |W₀|) (log scale)' : 'ΔE / (K₀ + |W₀|)'}
            yLog={driftScale === 'log'}
            markerX={markerTime}
            accessibilityLabel={`Energy drift against time for ${runs.map((r) => r.label).join(' and ')}`}
            testID="plot-energy"
          />
        )}
      </Panel>
      <Panel style={twoUp ? styles.half : undefined} title="Momentum drift" note="Change of total linear (solid, round marks) and angular (dashed, square marks) momentum, relative to their t = 0 scale.">
        <LinePlot series={momentum} xLabel="time [Myr]" yLabel="relative drift (log scale)" yLog markerX={markerTime} accessibilityLabel="Momentum and angular momentum drift against time" testID="plot-momentum" />
      </Panel>
      <Panel style={twoUp ? styles.half : undefined} title="Lagrangian radii" note="Radii about the density centre holding 10, 50 and 90% of the mass.">
        <LinePlot series={radii} xLabel="time [Myr]" yLabel="radius [kpc]" yFromZero markerX={markerTime} accessibilityLabel="Lagrangian radii against time" testID="plot-radii" />
      </Panel>
      <CentreDriftPlot runs={runs} markerTime={markerTime} style={twoUp ? styles.half : undefined} />
      <Panel style={twoUp ? styles.half : undefined} title="Virial ratio" note="1 in equilibrium; above 1 the system expands, below it contracts.">
        <LinePlot series={virial} xLabel="time [Myr]" yLabel="virial ratio" markerX={markerTime} accessibilityLabel="Virial ratio against time" testID="plot-virial" />
      </Panel>
    </View>
  );
}

const styles = StyleSheet.create({
  grid: { gap: space.lg },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap' },
  half: { flexBasis: '48%', flexGrow: 1, minWidth: 300 },
});
