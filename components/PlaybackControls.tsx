import { useState } from 'react';
import { StyleSheet, View, type GestureResponderEvent, type LayoutChangeEvent } from 'react-native';
import { colors, fonts, radius, space } from '../constants/theme';
import { locateFrame, PLAYBACK_SPEEDS, type Playhead } from './lib/playhead';
import { usePlayheadValue } from '../hooks/playback';
import { Button } from './Button';
import { ChoiceChips, Toggle } from './fields';
import type { Projection } from './ParticleView';
import { Txt } from './Txt';

const STEPS = 150;

export interface PlaybackControlsProps {
  playhead: Playhead;
  times: number[];
  projection: Projection;
  onProjection: (p: Projection) => void;
}

function useShownTime(playhead: Playhead): number {
  // While playing, the controls follow in 1/150 steps of the run rather than every animation
  // frame, so they cost little while the particles move; paused, they show the exact time.
  return usePlayheadValue(playhead, (p) => (p.playing && p.end > p.start ? p.start + Math.floor(((p.time - p.start) / (p.end - p.start)) * STEPS) * ((p.end - p.start) / STEPS) : p.time));
}

function Readout({ playhead, times }: { playhead: Playhead; times: number[] }) {
  const time = useShownTime(playhead);
  const { index } = locateFrame(times, time);
  return (
    <Txt style={styles.readout} accessibilityLiveRegion="polite" testID="playhead-readout">
      {`t = ${time.toFixed(time >= 100 ? 0 : 1)} Myr · ${times.length ? index + 1 : 0}/${times.length}`}
    </Txt>
  );
}

function Scrubber({ playhead, times }: { playhead: Playhead; times: number[] }) {
  const time = useShownTime(playhead);
  const [trackWidth, setTrackWidth] = useState(1);
  const start = times[0] ?? 0;
  const end = times[times.length - 1] ?? 0;
  const span = end - start || 1;
  const { index } = locateFrame(times, time);
  const fraction = (time - start) / span;
  const seekAt = (e: GestureResponderEvent) => {
    const x = e.nativeEvent.locationX;
    playhead.seek(start + Math.min(1, Math.max(0, x / trackWidth)) * span);
  };
  return (
    <View
      style={styles.track}
      onLayout={(e: LayoutChangeEvent) => setTrackWidth(Math.max(1, e.nativeEvent.layout.width))}
      onStartShouldSetResponder={() => true}
      onMoveShouldSetResponder={() => true}
      onResponderGrant={(e) => {
        playhead.pause();
        seekAt(e);
      }}
      onResponderMove={seekAt}
      role="slider"
      accessibilityLabel="Scrub through snapshots"
      accessibilityValue={{ min: 0, max: Math.max(0, times.length - 1), now: index, text: `snapshot ${index + 1} of ${times.length}, ${time.toFixed(1)} Myr` }}
      testID="scrub-track"
    >
      <View pointerEvents="none" style={[styles.fill, { width: `${Math.min(100, Math.max(0, fraction * 100))}%` }]} />
      <View pointerEvents="none" style={[styles.thumb, { left: Math.min(trackWidth - 14, Math.max(0, fraction * trackWidth - 7)) }]} />
    </View>
  );
}

/** Play, pause, step, scrub, speed, projection and blending for one or more particle views. */
export function PlaybackControls({ playhead, times, projection, onProjection }: PlaybackControlsProps) {
  // Only the read-out and the scrubber follow the time; the rest changes when someone presses it.
  const playing = usePlayheadValue(playhead, (p) => p.playing);
  const speed = usePlayheadValue(playhead, (p) => p.speed);
  const blend = usePlayheadValue(playhead, (p) => p.blend);

  return (
    <View style={styles.wrap}>
      <View style={styles.row}>
        <Button label={playing ? 'Pause' : 'Play'} small onPress={() => playhead.toggle()} disabled={times.length < 2} accessibilityLabel={playing ? 'Pause animation' : 'Play animation'} testID="play-toggle" />
        <Button label="◀" small tone="secondary" onPress={() => playhead.step(-1)} accessibilityLabel="Previous snapshot" />
        <Button label="▶" small tone="secondary" onPress={() => playhead.step(1)} accessibilityLabel="Next snapshot" />
        <Readout playhead={playhead} times={times} />
      </View>
      <Scrubber playhead={playhead} times={times} />
      <View style={styles.row}>
        <ChoiceChips compact label="Speed" value={speed} onChange={(s) => playhead.setSpeed(s)} choices={PLAYBACK_SPEEDS.map((s) => ({ value: s, label: `${s}×` }))} />
        <ChoiceChips
          compact
          label="Projection"
          value={projection}
          onChange={onProjection}
          choices={(['xy', 'xz', 'yz'] as const).map((p) => ({ value: p, label: p }))}
        />
      </View>
      <Toggle label="Blend between snapshots" value={blend} onChange={(b) => playhead.setBlend(b)} hint={blend ? 'Smooth: positions are interpolated between stored snapshots.' : 'Exact: each stored snapshot is held until the next.'} />
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.md, width: '100%' },
  row: { flexDirection: 'row', alignItems: 'center', gap: space.sm, flexWrap: 'wrap' },
  readout: { fontFamily: fonts.mono, fontSize: 13, color: colors.text, marginLeft: space.xs },
  track: { height: 28, justifyContent: 'center', backgroundColor: colors.surfaceRaised, borderRadius: radius.pill, borderWidth: 1, borderColor: colors.border, overflow: 'hidden', cursor: 'pointer' } as object,
  fill: { position: 'absolute', left: 0, top: 0, bottom: 0, backgroundColor: colors.accent, opacity: 0.35 },
  thumb: { position: 'absolute', width: 14, height: 22, top: 2, borderRadius: 7, backgroundColor: colors.accent },
});
