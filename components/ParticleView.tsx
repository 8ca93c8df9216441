import { memo, useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import type { SnapshotFrame } from '../shared/api/snapshots';
import { colors, fonts } from '../constants/theme';
import { locateFrame, usePlayheadValue, type Playhead } from '../hooks/playback';
import { dotSize, frameWindow, particlePath, scaleBarLength, type Framing, type Projection } from './particles';

export type { Projection } from './particles';

export interface ParticleViewProps {
  frames: SnapshotFrame[];
  playhead: Playhead;
  projection: Projection;
  color: string;
  /** Spoken name of this view, e.g. the run and law. */
  label: string;
  maxSize?: number;
}


/** The moving part, re-rendered on each playhead tick while the frame around it stays still. */
const Cloud = memo(function Cloud({ frames, times, playhead, projection, win, size, color }: { frames: SnapshotFrame[]; times: number[]; playhead: Playhead; projection: Projection; win: Framing; size: number; color: string }) {
  const time = usePlayheadValue(playhead, (p) => p.time);
  const blend = usePlayheadValue(playhead, (p) => p.blend);
  const { index, fraction } = locateFrame(times, time);
  const frame = frames[index];
  const next = blend && index + 1 < frames.length ? frames[index + 1].positions : null;
  const d = frame ? particlePath(frame.positions, next, fraction, projection, win, size, dotSize(frame.positions.length / 3)) : '';
  return <Path d={d} fill={color} fillOpacity={0.85} testID="particle-cloud" />;
});

export function ParticleView({ frames, playhead, projection, color, label, maxSize = 520 }: ParticleViewProps) {
  const [width, setWidth] = useState(320);
  const size = Math.max(160, Math.min(width, maxSize));
  const times = useMemo(() => frames.map((f) => f.time_Myr), [frames]);
  const win = useMemo(() => frameWindow(frames, projection), [frames, projection]);
  const bar = scaleBarLength(win.half);
  const barPx = (bar / (2 * win.half)) * size;
  const [h, v] = projection.split('');
  const n = frames[0] ? frames[0].positions.length / 3 : 0;

  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (w > 0 && w !== width) setWidth(w);
  };

  return (
    <View style={styles.wrap} onLayout={onLayout}>
      <View role="img" accessibilityLabel={`${label}: ${n} particles projected on the ${projection} plane, view ${formatKpc(2 * win.half)} across`} style={[styles.box, { width: size, height: size }]}>
        <Svg width={size} height={size}>
          <Rect x={0} y={0} width={size} height={size} fill={colors.background} />
          <Line x1={size / 2} x2={size / 2} y1={0} y2={size} stroke={colors.border} strokeWidth={1} strokeDasharray="2 6" />
          <Line x1={0} x2={size} y1={size / 2} y2={size / 2} stroke={colors.border} strokeWidth={1} strokeDasharray="2 6" />
          <Cloud frames={frames} times={times} playhead={playhead} projection={projection} win={win} size={size} color={color} />
          <Line x1={12} x2={12 + barPx} y1={size - 14} y2={size - 14} stroke={colors.text} strokeWidth={2} />
          <SvgText x={12} y={size - 20} fill={colors.text} fontSize={11} fontFamily={fonts.mono}>
            {formatKpc(bar)}
          </SvgText>
          <SvgText x={size - 10} y={size - 10} fill={colors.textMuted} fontSize={11} fontFamily={fonts.mono} textAnchor="end">
            {`${h} →  ${v} ↑`}
          </SvgText>
        </Svg>
      </View>
    </View>
  );
}

function formatKpc(v: number): string {
  return v >= 1 ? `${Number(v.toPrecision(3))} kpc` : `${Number((v * 1000).toPrecision(3))} pc`;
}

const styles = StyleSheet.create({
  wrap: { width: '100%', alignItems: 'center', gap: 6 },
  // Its own compositing layer: each frame re-rasters only the square, not the page around it.
  box: { borderRadius: 12, overflow: 'hidden', borderWidth: 1, borderColor: colors.border, willChange: 'transform' } as object,
});
