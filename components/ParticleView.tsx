import { memo, useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import type { SnapshotFrame } from '../shared/api/snapshots';
import { colors, fonts } from '../constants/theme';
import { locateFrame, usePlayheadValue, type Playhead } from '../hooks/playback';

export type Projection = 'xy' | 'xz' | 'yz';
const AXES: Record<Projection, [number, number]> = { xy: [0, 1], xz: [0, 2], yz: [1, 2] };

export interface ParticleViewProps {
  frames: SnapshotFrame[];
  playhead: Playhead;
  projection: Projection;
  color: string;
  /** Spoken name of this view, e.g. the run and law. */
  label: string;
  maxSize?: number;
}

interface Framing {
  cx: number;
  cy: number;
  /** Half the side of the square shown, kpc. */
  half: number;
}

function percentile(values: Float64Array, q: number): number {
  const sorted = Float64Array.from(values).sort();
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))] ?? 0;
}

/**
 * A fixed window for the whole run so motion reads as motion: centred on the first
 * snapshot's median, wide enough for 99% of particles in the first, middle and last
 * snapshots (a few escapers would otherwise shrink everything to a dot).
 */
export function frameWindow(frames: SnapshotFrame[], projection: Projection): Framing {
  if (!frames.length || frames[0].positions.length === 0) return { cx: 0, cy: 0, half: 1 };
  const [a, b] = AXES[projection];
  const first = frames[0].positions;
  const n = first.length / 3;
  const xs = new Float64Array(n);
  const ys = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    xs[i] = first[3 * i + a];
    ys[i] = first[3 * i + b];
  }
  const cx = percentile(xs, 0.5);
  const cy = percentile(ys, 0.5);
  const picks = [frames[0], frames[frames.length >> 1], frames[frames.length - 1]];
  const reach = new Float64Array(n * picks.length);
  picks.forEach((f, k) => {
    for (let i = 0; i < n; i++) reach[k * n + i] = Math.max(Math.abs(f.positions[3 * i + a] - cx), Math.abs(f.positions[3 * i + b] - cy));
  });
  const half = percentile(reach, 0.99) * 1.1;
  return { cx, cy, half: half > 0 ? half : 1 };
}

/** A length for the scale bar: 1, 2 or 5 times a power of ten, about a fifth of the view. */
export function scaleBarLength(half_kpc: number): number {
  const target = (2 * half_kpc) / 5;
  const p = 10 ** Math.floor(Math.log10(target));
  const m = target / p;
  return p * (m >= 5 ? 5 : m >= 2 ? 2 : 1);
}

/**
 * Every particle as a tiny square in one SVG path: one element per frame instead of
 * thousands keeps 5,000 particles well above 30 frames per second on the web.
 */
export function particlePath(positions: Float32Array, next: Float32Array | null, fraction: number, projection: Projection, win: Framing, size: number, dot: number): string {
  const [a, b] = AXES[projection];
  const s = size / (2 * win.half);
  const mid = size / 2;
  const n = positions.length / 3;
  const parts: string[] = new Array(n);
  let k = 0;
  const blend = next !== null && fraction > 0;
  for (let i = 0; i < n; i++) {
    let u = positions[3 * i + a];
    let v = positions[3 * i + b];
    if (blend) {
      u += (next![3 * i + a] - u) * fraction;
      v += (next![3 * i + b] - v) * fraction;
    }
    const px = mid + (u - win.cx) * s;
    const py = mid - (v - win.cy) * s;
    if (px < 0 || py < 0 || px > size || py > size) continue;
    parts[k++] = `M${px.toFixed(1)} ${py.toFixed(1)}h${dot}v${dot}h-${dot}z`;
  }
  parts.length = k;
  return parts.join('');
}

function dotSize(n: number): number {
  return n <= 16 ? 6 : n <= 300 ? 3 : n <= 2500 ? 2 : 1.5;
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
  box: { borderRadius: 12, overflow: 'hidden', borderWidth: 1, borderColor: colors.border },
});
