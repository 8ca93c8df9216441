import { StyleSheet, View } from 'react-native';
import type { EngineWarning, Timescales } from '../../shared/engine';
import type { RunOutputView } from '../lib/runOutput';
import { colors, space } from '../../constants/theme';
import { formatCount, formatValue } from '../format';
import { Panel } from '../Panel';
import { Notice } from '../States';
import { Txt } from '../Txt';

export function Fact({ label, value, unit }: { label: string; value: string; unit?: string }) {
  return (
    <View style={styles.fact} accessibilityLabel={`${label}: ${value}${unit ? ` ${unit}` : ''}`}>
      <Txt variant="caption">{label}</Txt>
      <Txt variant="mono" color={colors.text}>
        {value}
        {unit ? <Txt variant="caption"> {unit}</Txt> : null}
      </Txt>
    </View>
  );
}

export function TimescaleFacts({ t }: { t: Timescales }) {
  return (
    <View style={styles.facts}>
      <Fact label="half-mass radius" value={formatValue(t.halfMassRadius_kpc)} unit="kpc" />
      <Fact label="rms speed" value={formatValue(t.rmsSpeed_km_s)} unit="km/s" />
      <Fact label="crossing time" value={formatValue(t.crossingTime_Myr)} unit="Myr" />
      <Fact label="relaxation time" value={t.relaxationTime_Myr === null ? 'n/a' : formatValue(t.relaxationTime_Myr)} unit={t.relaxationTime_Myr === null ? undefined : 'Myr'} />
      {t.orbitalPeriod_Myr !== null ? <Fact label="orbital period" value={formatValue(t.orbitalPeriod_Myr)} unit="Myr" /> : null}
      <Fact label="suggested timestep" value={formatValue(t.suggestedTimestep_Myr)} unit="Myr" />
      <Fact label="steps" value={formatCount(t.steps)} />
      <Fact label="force evaluations" value={formatCount(t.forceEvaluations)} />
    </View>
  );
}

export function EngineWarnings({ warnings }: { warnings: EngineWarning[] }) {
  if (!warnings.length) return <Notice tone="ok">No warnings from the engine's checks.</Notice>;
  return (
    <View style={{ gap: space.sm }} accessibilityLabel={`${warnings.length} engine warnings`}>
      {warnings.map((w) => (
        <Notice key={w.code} tone={w.severity === 'warning' ? 'warning' : 'info'}>
          <Txt variant="small" color={colors.text}>
            {w.message}
          </Txt>
          <Txt variant="caption">Source: {w.source}</Txt>
        </Notice>
      ))}
    </View>
  );
}

/** The run's headline numbers, timescales and the engine's warnings. */
export function RunFacts({ out }: { out: RunOutputView }) {
  const s = out.summary;
  const meaning = (m: string) => (m === 'conserved' ? 'should stay near 0' : m === 'not-conserved' ? 'not conserved by this law' : 'not defined');
  return (
    <Panel title="Outcome">
      <View style={styles.facts}>
        <Fact label="final ΔE/(K₀+|W₀|)" value={formatValue(s.finalEnergyDrift)} />
        <Fact label="max |ΔE|/(K₀+|W₀|)" value={formatValue(s.maxAbsEnergyDrift)} />
        <Fact label="final momentum drift" value={formatValue(s.finalMomentumDrift)} />
        <Fact label="final ang. momentum drift" value={formatValue(s.finalAngularMomentumDrift)} />
        <Fact label="steps done" value={`${formatCount(s.stepsCompleted)} / ${formatCount(s.totalSteps)}`} />
        <Fact label="final time" value={formatValue(s.finalTime_Myr)} unit="Myr" />
      </View>
      <Txt variant="caption">
        Energy: {meaning(s.quantities.energy)} · momentum: {meaning(s.quantities.momentum)} · angular momentum: {meaning(s.quantities.angularMomentum)}
      </Txt>
      <Txt variant="label">Timescales at t = 0</Txt>
      <TimescaleFacts t={out.timescales} />
      <Txt variant="label">Engine checks</Txt>
      <EngineWarnings warnings={out.warnings} />
    </Panel>
  );
}

const styles = StyleSheet.create({
  facts: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md },
  fact: { minWidth: 130, flexGrow: 1, flexBasis: 130, gap: 2 },
});
