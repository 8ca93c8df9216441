import { View } from 'react-native';
import { colors, lawColor, space } from '../../constants/theme';
import type { Preview } from './preview';
import { Button } from '../Button';
import { formatValue } from '../format';
import { isReferenceLaw, lawName } from '../../shared/engine';
import { LinePlot, type PlotSeries } from '../LinePlot';
import { Panel } from '../Panel';
import { Notice } from '../States';
import { Txt } from '../Txt';
import { EngineWarnings, TimescaleFacts } from '../run/RunFacts';

/** The analytic rotation curve of the chosen model under the chosen law(s) and Newton. */
export function CurvePreview({ preview, isOrbit }: { preview: Preview | null; isOrbit: boolean }) {
  const series: PlotSeries[] =
    // The reference law's curve is drawn quietly, dashed, beside the chosen laws'.
    preview?.curves?.curves.map((c) => ({ id: c.law, label: c.label, color: isReferenceLaw(c.law) ? colors.textMuted : lawColor(c.law), x: preview.curves!.radii_kpc, y: c.v_km_s, dashed: isReferenceLaw(c.law) })) ?? [];
  return (
    <Panel title="Rotation curve preview" note="Circular speed √(R g) of the initial mass model, analytic, before any particles move.">
      {isOrbit ? (
        <Txt variant="small">A two-body orbit has no extended mass model, so there is no rotation curve to preview.</Txt>
      ) : preview?.curvesError ? (
        <Notice tone="info">{`No preview for this model: ${preview.curvesError}`}</Notice>
      ) : (
        <LinePlot series={series} xLabel="radius R [kpc]" yLabel="circular speed [km/s]" yFromZero accessibilityLabel={`Analytic rotation curves under ${series.map((s) => s.label).join(', ')}`} emptyText="Fix the highlighted fields to see the preview" testID="plot-preview" />
      )}
    </Panel>
  );
}

/** A timestep at or below the suggestion, rounded down to two significant digits. */
export function roundedTimestep(suggested: number): number {
  const p = 10 ** (Math.floor(Math.log10(suggested)) - 1);
  return Math.floor(suggested / p) * p;
}

/** Timescales and the engine's warnings (timestep, softening, relaxation) before submitting. */
export function ChecksPreview({ preview, timestep, onTimestep }: { preview: Preview | null; timestep?: number; onTimestep: (dt: number) => void }) {
  const suggested = preview?.checks.length ? roundedTimestep(Math.min(...preview.checks.map((c) => c.timescales.suggestedTimestep_Myr))) : null;
  return (
    <Panel title="Engine checks" note="Computed from the initial particles this spec draws; nothing has run yet.">
      {!preview ? (
        <Txt variant="small">Fix the highlighted fields to run the checks.</Txt>
      ) : preview.checksError ? (
        <Notice tone="info">{`The checks could not run for this model: ${preview.checksError}`}</Notice>
      ) : (
        <View style={{ gap: space.md }}>
          <TimescaleFacts t={preview.checks[0].timescales} />
          {suggested !== null && timestep !== undefined && timestep > suggested ? (
            <Button small tone="secondary" label={`Use the suggested timestep, ${formatValue(suggested)} Myr`} onPress={() => onTimestep(Number(suggested.toPrecision(2)))} style={{ alignSelf: 'flex-start' }} testID="use-suggested-timestep" />
          ) : null}
          {preview.checks.map((c) => (
            <View key={c.law} style={{ gap: space.sm }}>
              {preview.checks.length > 1 ? <Txt variant="label">Under {lawName(c.law)}</Txt> : null}
              <EngineWarnings warnings={c.warnings} />
            </View>
          ))}
        </View>
      )}
    </Panel>
  );
}
