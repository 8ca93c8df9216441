import { memo, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Platform, StyleSheet, Text, View, type LayoutChangeEvent } from 'react-native';
import Svg, { Line, Path, Rect, Text as SvgText } from 'react-native-svg';
import type { ParticleParts, SnapshotFrame } from '../shared/api/snapshots';
import { colors, componentColor, fonts, space, type as typeSize } from '../constants/theme';
import { locateFrame, type Playhead } from './lib/playhead';
import { usePlayheadValue } from '../hooks/playback';
import { backdrop, dotSize, drawOrder, drawParticles, frameWindow, particlePath, pixelColor, scaleBarLength, type Framing, type Projection } from './particles';

export type { Projection } from './particles';

export interface ParticleViewProps {
  frames: SnapshotFrame[];
  /** Which model part each particle belongs to; without it all share `color`. */
  parts?: ParticleParts;
  playhead: Playhead;
  projection: Projection;
  /** The run's colour: used for a run of one unnamed part. */
  color: string;
  /** Spoken name of this view, e.g. the run and law. */
  label: string;
  maxSize?: number;
}

interface Drawing {
  frames: SnapshotFrame[];
  times: number[];
  playhead: Playhead;
  projection: Projection;
  win: Framing;
  size: number;
  labels: string[];
  component: Uint8Array;
  paints: string[];
}

/**
 * The web's view: particles written as pixels into a canvas on each playhead tick, outside
 * React, so 50,000 of them keep the animation at the display's rate. Says so when the page
 * has no 2D canvas (a test's DOM), and the view falls back to SVG.
 */
function ParticleCanvas({ frames, times, playhead, projection, win, size, labels, component, paints, onUnavailable }: Drawing & { onUnavailable: () => void }) {
  const ref = useRef<HTMLCanvasElement>(null);
  const dpr = typeof window !== 'undefined' && window.devicePixelRatio > 0 ? window.devicePixelRatio : 1;
  const px = Math.round(size * dpr);
  const order = useMemo(() => drawOrder(component, labels), [component, labels]);

  useEffect(() => {
    const ctx = ref.current?.getContext('2d');
    if (!ctx) return onUnavailable();
    const image = ctx.createImageData(px, px);
    const pixels = new Uint32Array(image.data.buffer);
    const base = backdrop(px, pixelColor(colors.background), pixelColor(colors.border));
    const paint = Uint32Array.from(paints, pixelColor);
    const n = frames[0] ? frames[0].positions.length / 3 : 0;
    const dot = Math.max(1, Math.round(dotSize(n) * dpr));
    let shown = '';
    const draw = () => {
      const { index, fraction } = locateFrame(times, playhead.time);
      const f = playhead.blend && index + 1 < frames.length ? fraction : 0;
      if (`${index}:${f}` === shown) return; // a control changed, not the picture
      shown = `${index}:${f}`;
      pixels.set(base);
      const frame = frames[index];
      if (frame) drawParticles(pixels, px, frame.positions, f > 0 ? frames[index + 1].positions : null, f, projection, win, dot, order, component, paint);
      ctx.putImageData(image, 0, 0);
    };
    draw();
    const off = playhead.subscribe(draw);
    return () => {
      off();
    };
  }, [frames, times, playhead, projection, win, px, dpr, order, component, paints, onUnavailable]);

  return <canvas ref={ref} width={px} height={px} data-testid="particle-cloud" aria-hidden style={{ width: size, height: size, display: 'block' }} />;
}

/** The SVG fallback's moving part: one path per model part, re-rendered on each playhead tick. */
const Cloud = memo(function Cloud({ frames, times, playhead, projection, win, size, component, paints }: Drawing) {
  const time = usePlayheadValue(playhead, (p) => p.time);
  const blend = usePlayheadValue(playhead, (p) => p.blend);
  const { index, fraction } = locateFrame(times, time);
  const frame = frames[index];
  const next = blend && index + 1 < frames.length ? frames[index + 1].positions : null;
  const dot = frame ? dotSize(frame.positions.length / 3) : 1;
  return (
    <>
      {paints.map((paint, k) => (
        <Path key={k} d={frame ? particlePath(frame.positions, next, fraction, projection, win, size, dot, paints.length > 1 ? { component, index: k } : undefined) : ''} fill={paint} fillOpacity={0.85} testID={k === 0 ? 'particle-cloud' : undefined} />
      ))}
    </>
  );
});

export function ParticleView({ frames, parts, playhead, projection, color, label, maxSize = 520 }: ParticleViewProps) {
  const [width, setWidth] = useState(320);
  const [canvas, setCanvas] = useState(Platform.OS === 'web');
  const noCanvas = useCallback(() => setCanvas(false), []);
  const size = Math.max(160, Math.min(width, maxSize));
  const times = useMemo(() => frames.map((f) => f.time_Myr), [frames]);
  const win = useMemo(() => frameWindow(frames, projection), [frames, projection]);
  const bar = scaleBarLength(win.half);
  const barPx = (bar / (2 * win.half)) * size;
  const [h, v] = projection.split('');
  const n = frames[0] ? frames[0].positions.length / 3 : 0;
  // Parts that do not match the frames (never expected) are ignored rather than misdrawn.
  const known = parts !== undefined && parts.component.length === n && parts.labels.length > 0;
  const labels = useMemo(() => (known ? parts.labels : []), [known, parts]);
  const component = useMemo(() => (known ? parts.component : new Uint8Array(n)), [known, parts, n]);
  const paints = useMemo(() => (labels.length ? labels.map((l, k) => componentColor(l, k, labels.length, color)) : [color]), [labels, color]);
  const counts = useMemo(() => {
    const c = new Array<number>(labels.length).fill(0);
    for (const k of component) if (k < c.length) c[k]++;
    return c;
  }, [component, labels]);
  const drawing: Drawing = { frames, times, playhead, projection, win, size, labels, component, paints };

  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (w > 0 && w !== width) setWidth(w);
  };

  // Scale bar and axis names, over the particles in both ways of drawing them.
  const marks = (
    <>
      <Line x1={12} x2={12 + barPx} y1={size - 14} y2={size - 14} stroke={colors.text} strokeWidth={2} />
      <SvgText x={12} y={size - 20} fill={colors.text} fontSize={11} fontFamily={fonts.mono}>
        {formatKpc(bar)}
      </SvgText>
      <SvgText x={size - 10} y={size - 10} fill={colors.textMuted} fontSize={11} fontFamily={fonts.mono} textAnchor="end">
        {`${h} →  ${v} ↑`}
      </SvgText>
    </>
  );

  return (
    <View style={styles.wrap} onLayout={onLayout}>
      <View role="img" accessibilityLabel={`${label}: ${n} particles projected on the ${projection} plane, view ${formatKpc(2 * win.half)} across`} style={[styles.box, { width: size, height: size }]}>
        {canvas ? (
          <>
            <ParticleCanvas {...drawing} onUnavailable={noCanvas} />
            <Svg width={size} height={size} style={StyleSheet.absoluteFill}>
              {marks}
            </Svg>
          </>
        ) : (
          <Svg width={size} height={size}>
            <Rect x={0} y={0} width={size} height={size} fill={colors.background} />
            <Line x1={size / 2} x2={size / 2} y1={0} y2={size} stroke={colors.border} strokeWidth={1} strokeDasharray="2 6" />
            <Line x1={0} x2={size} y1={size / 2} y2={size / 2} stroke={colors.border} strokeWidth={1} strokeDasharray="2 6" />
            <Cloud {...drawing} />
            {marks}
          </Svg>
        )}
      </View>
      {labels.length ? (
        <View style={styles.legend} testID="particle-legend">
          {labels.map((l, k) => (
            <View key={k} style={styles.key}>
              <View style={[styles.swatch, { backgroundColor: paints[k] }]} />
              <Text style={styles.keyText}>{`${l} · ${counts[k].toLocaleString('en-US')}`}</Text>
            </View>
          ))}
        </View>
      ) : null}
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
  legend: { flexDirection: 'row', flexWrap: 'wrap', justifyContent: 'center', columnGap: space.md, rowGap: space.xs },
  key: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 10, height: 10, borderRadius: 5 },
  keyText: { color: colors.textMuted, fontSize: typeSize.caption, fontFamily: fonts.mono },
});
