import { StyleSheet, View } from 'react-native';
import type { RunDetail } from '../../shared/api/contract';
import { colors, fonts, lawColor, space } from '../../constants/theme';
import type { RunStream } from '../../hooks/runEvents';
import { magnitude } from '../lib/runOutput';
import { formatCount, formatValue } from '../format';
import { LinePlot } from '../LinePlot';
import { Panel } from '../Panel';
import { ProgressBar } from '../RunCard';
import { Txt } from '../Txt';

const STREAM_WORDS: Record<RunStream['state'], string> = {
  idle: 'not connected',
  connecting: 'connecting…',
  open: 'live',
  reconnecting: 'connection lost, retrying…',
  ended: 'ended',
};

/** Where a queued or running run stands, updated from its event stream. */
export function LiveProgress({ run, stream, hasPotential, lawLabel, color = lawColor(run.lawKind) }: { run: RunDetail; stream: RunStream; hasPotential: boolean; lawLabel?: string; color?: string }) {
  const p = stream.progress;
  const percent = p ? p.percent : run.progress * 100;
  const doing = run.status === 'queued' ? 'Waiting for a worker' : 'Integrating';
  const drift = stream.drift;
  return (
    <Panel title={lawLabel ? `${doing} · ${lawLabel}` : doing} right={<Txt variant="caption" color={stream.state === 'open' ? colors.ok : colors.textMuted} accessibilityLiveRegion="polite">● {STREAM_WORDS[stream.state]}</Txt>}>
      <View style={styles.big}>
        <Txt style={styles.percent} accessibilityLabel={`${Math.floor(percent)} percent done`} testID="live-percent">
          {Math.floor(percent)}%
        </Txt>
        <View style={styles.facts}>
          <Txt variant="mono">step {p ? `${formatCount(p.step)} / ${formatCount(p.totalSteps)}` : `– / ${formatCount(run.steps)}`}</Txt>
          <Txt variant="mono">t = {p ? formatValue(p.time_Myr) : '–'} Myr</Txt>
          <Txt variant="mono">ΔE/(K₀+|W₀|) = {hasPotential ? formatValue(p?.energyDrift ?? null) : 'n/a'}</Txt>
        </View>
      </View>
      <ProgressBar value={percent / 100} color={color} label={`${run.name} progress`} />
      {hasPotential ? (
        <LinePlot
          series={[{ id: 'live', label: '|ΔE| / (K₀+|W₀|) so far', color, x: drift.map((d) => d.time_Myr), y: magnitude(drift.map((d) => d.energyDrift)) }]}
          xLabel="time [Myr]"
          yLabel="|ΔE| / (K₀+|W₀|) (log scale)"
          yLog
          xFromZero
          height={180}
          accessibilityLabel="Live energy drift of the running integration"
          emptyText={run.status === 'queued' ? 'The drift appears once the run starts' : 'Waiting for the first drift sample'}
          testID="plot-live-drift"
        />
      ) : (
        <Txt variant="small">This law has no potential energy, so there is no energy drift to follow live; momentum and structure are plotted when the run ends.</Txt>
      )}
    </Panel>
  );
}

const styles = StyleSheet.create({
  big: { flexDirection: 'row', alignItems: 'center', gap: space.lg, flexWrap: 'wrap' },
  percent: { fontFamily: fonts.heading, fontSize: 44, color: colors.text },
  facts: { gap: 2 },
});
