import { memo, useMemo, useState } from 'react';
import { Pressable, StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { G, Line, Path, Text as SvgText } from 'react-native-svg';
import { line } from 'd3-shape';
import { colors, fonts, space } from '../constants/theme';
import { formatTick, makeScale, niceDomain, type AxisTick, type Scale } from './plot/scale';
import { Txt } from './Txt';

/** Point marks that tell series apart without relying on colour or dashing. */
export type PlotMark = 'circle' | 'square' | 'triangle' | 'diamond';

const MARK_WORDS: Record<PlotMark, string> = { circle: 'round marks', square: 'square marks', triangle: 'triangle marks', diamond: 'diamond marks' };

export interface PlotSeries {
  id: string;
  label: string;
  color: string;
  x: ArrayLike<number>;
  /** null leaves a gap (e.g. a law without an energy). */
  y: ArrayLike<number | null>;
  dashed?: boolean;
  mark?: PlotMark;
  /** Legend heading the series is listed under (e.g. "measured from particles"). */
  group?: string;
  /** Starts switched off; the legend entry turns it on. */
  hidden?: boolean;
  /** Measured points: a mark at every point and no line (needs `mark`). */
  pointsOnly?: boolean;
  /** One-sigma error on each y, drawn as a vertical bar. */
  yError?: ArrayLike<number>;
}

export interface LinePlotProps {
  series: PlotSeries[];
  /** Axis titles carry their units, e.g. "time [Myr]". */
  xLabel: string;
  yLabel: string;
  xLog?: boolean;
  yLog?: boolean;
  height?: number;
  /** Fixed ranges; otherwise taken from the data. */
  xDomain?: [number, number];
  yDomain?: [number, number];
  /** Start a linear y axis at zero (speeds, radii). */
  yFromZero?: boolean;
  /** Start a linear x axis at zero (time since the start of a run). */
  xFromZero?: boolean;
  /** A vertical guide, e.g. the time of the frame on screen. */
  markerX?: number;
  /** Spoken summary of what the plot shows. */
  accessibilityLabel: string;
  emptyText?: string;
  testID?: string;
}

const M = { top: 8, right: 14, bottom: 34, left: 58 };
const MARKS_PER_SERIES = 10; // enough to read the shape, few enough not to hide the line

function usable(v: number | null | undefined, log: boolean): v is number {
  return v !== null && v !== undefined && Number.isFinite(v) && (!log || v > 0);
}

function extent(series: PlotSeries[], axis: 'x' | 'y', log: boolean): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  const take = (v: number) => {
    if (!usable(v, log)) return;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  };
  for (const s of series) {
    const arr = s[axis];
    for (let i = 0; i < arr.length; i++) {
      const v = arr[i];
      if (usable(v, log) && usable(axis === 'x' ? s.y[i] : s.x[i], false)) {
        take(v);
        // Error bars stay inside the frame.
        const e = axis === 'y' ? s.yError?.[i] : undefined;
        if (e !== undefined && Number.isFinite(e)) {
          take(v - e);
          take(v + e);
        }
      }
    }
  }
  return [lo, hi];
}

/** SVG path of one mark centred on (x, y). */
function markPath(mark: PlotMark, x: number, y: number): string {
  const f = (v: number) => v.toFixed(1);
  switch (mark) {
    case 'circle':
      return `M${f(x - 3.5)},${f(y)}a3.5,3.5 0 1,0 7,0a3.5,3.5 0 1,0 -7,0Z`;
    case 'square':
      return `M${f(x - 3)},${f(y - 3)}h6v6h-6Z`;
    case 'triangle':
      return `M${f(x)},${f(y - 4)}L${f(x + 4)},${f(y + 3)}L${f(x - 4)},${f(y + 3)}Z`;
    case 'diamond':
      return `M${f(x)},${f(y - 4.5)}L${f(x + 4.5)},${f(y)}L${f(x)},${f(y + 4.5)}L${f(x - 4.5)},${f(y)}Z`;
  }
}

interface PlotGeometry {
  x: Scale;
  y: Scale;
  paths: { s: PlotSeries; d: string; marks: string; bars: string }[];
  xt: AxisTick[];
  yt: AxisTick[];
}

/** Grid, ticks and lines: memoised, so a moving marker does not redraw them. */
const Axes = memo(function Axes({ plot, width, height, xLabel, xLog, yLog }: { plot: PlotGeometry; width: number; height: number; xLabel: string; xLog: boolean; yLog: boolean }) {
  const yLabelled = plot.yt.filter((t) => t.labelled).map((t) => t.value);
  const xLabelled = plot.xt.filter((t) => t.labelled).map((t) => t.value);
  return (
    <G>
      {plot.yt.map((t) =>
        t.labelled ? (
          <G key={`y${t.value}`}>
            <Line x1={M.left} x2={width - M.right} y1={plot.y(t.value)} y2={plot.y(t.value)} stroke={colors.border} strokeWidth={1} />
            <SvgText x={M.left - 6} y={plot.y(t.value) + 4} fill={colors.textMuted} fontSize={10} fontFamily={fonts.mono} textAnchor="end">
              {formatTick(t.value, yLabelled, yLog)}
            </SvgText>
          </G>
        ) : (
          <Line key={`y${t.value}`} x1={M.left - 3} x2={M.left} y1={plot.y(t.value)} y2={plot.y(t.value)} stroke={colors.borderStrong} strokeWidth={1} />
        ),
      )}
      {plot.xt.map((t) => (
        <G key={`x${t.value}`}>
          <Line x1={plot.x(t.value)} x2={plot.x(t.value)} y1={height - M.bottom} y2={height - M.bottom + (t.labelled ? 4 : 2)} stroke={colors.borderStrong} strokeWidth={1} />
          {t.labelled ? (
            <SvgText x={plot.x(t.value)} y={height - M.bottom + 16} fill={colors.textMuted} fontSize={10} fontFamily={fonts.mono} textAnchor="middle">
              {formatTick(t.value, xLabelled, xLog)}
            </SvgText>
          ) : null}
        </G>
      ))}
      <Line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke={colors.borderStrong} strokeWidth={1} />
      <Line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke={colors.borderStrong} strokeWidth={1} />
      {plot.paths.map(({ s, d, marks, bars }) => (
        <G key={s.id}>
          {bars ? <Path d={bars} stroke={s.color} strokeWidth={1.2} fill="none" /> : null}
          {d ? <Path d={d} stroke={s.color} strokeWidth={2} fill="none" strokeDasharray={s.dashed ? '6 4' : undefined} strokeLinejoin="round" /> : null}
          {marks ? <Path d={marks} fill={s.color} stroke={colors.surface} strokeWidth={1} /> : null}
        </G>
      ))}
      <SvgText x={(M.left + width - M.right) / 2} y={height - 4} fill={colors.textMuted} fontSize={11} fontFamily={fonts.body} textAnchor="middle">
        {xLabel}
      </SvgText>
    </G>
  );
});

/** The legend's sample of a series: its line (solid or dashed) with its mark. */
function Swatch({ s, on }: { s: PlotSeries; on: boolean }) {
  return (
    <Svg width={26} height={12} style={{ opacity: on ? 1 : 0.35 }}>
      {s.pointsOnly ? (s.yError ? <Line x1={13} x2={13} y1={0} y2={12} stroke={s.color} strokeWidth={1.2} /> : null) : <Line x1={1} x2={25} y1={6} y2={6} stroke={s.color} strokeWidth={2} strokeDasharray={s.dashed ? '4 3' : undefined} />}
      {s.mark ? <Path d={markPath(s.mark, 13, 6)} fill={s.color} stroke={colors.surface} strokeWidth={1} /> : null}
    </Svg>
  );
}

function LegendEntry({ s, on, onToggle }: { s: PlotSeries; on: boolean; onToggle: () => void }) {
  const looks = [s.pointsOnly ? 'points' : s.dashed ? 'dashed line' : 'solid line', s.mark ? MARK_WORDS[s.mark] : null, s.yError ? 'error bars' : null].filter(Boolean).join(' with ');
  return (
    <Pressable
      onPress={onToggle}
      role="button"
      aria-pressed={on}
      accessibilityLabel={`${s.label}, ${looks}`}
      accessibilityHint={on ? 'Hides this curve' : 'Shows this curve'}
      style={({ pressed }) => [styles.legendItem, pressed && styles.legendPressed]}
      testID={`legend-${s.id}`}
    >
      <Swatch s={s} on={on} />
      <Txt variant="caption" color={on ? colors.text : colors.textFaint} style={on ? undefined : styles.off}>
        {s.label}
      </Txt>
    </Pressable>
  );
}

/**
 * A line plot with axes, units, ticks and a legend; linear or log on either axis. Each legend
 * entry switches its series on and off; series with a `group` are listed under its heading.
 */
export function LinePlot({ series, xLabel, yLabel, xLog = false, yLog = false, height = 220, xDomain, yDomain, yFromZero = false, xFromZero = false, markerX, accessibilityLabel, emptyText, testID }: LinePlotProps) {
  const [width, setWidth] = useState(320);
  // Someone's choice per series id (legend entries are toggle buttons: Enter or Space); series they have not touched follow their `hidden` flag.
  const [picked, setPicked] = useState<Record<string, boolean>>({});
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (w > 0 && w !== width) setWidth(w);
  };
  const isOn = (s: PlotSeries) => picked[s.id] ?? !s.hidden;
  const shown = useMemo(() => series.filter((s) => picked[s.id] ?? !s.hidden), [series, picked]);

  const plot = useMemo((): PlotGeometry | null => {
    // The axes span every series, shown or not, so switching one off does not rescale the rest.
    const [xl, xh] = xDomain ?? extent(series, 'x', xLog);
    const [yl, yh] = yDomain ?? extent(series, 'y', yLog);
    if (!Number.isFinite(xl) || !Number.isFinite(yl)) return null;
    const xd = xDomain ?? niceDomain(xFromZero && !xLog ? Math.min(0, xl) : xl, xh, xLog);
    const yd = yDomain ?? niceDomain(yFromZero && !yLog ? Math.min(0, yl) : yl, yh, yLog);
    const x = makeScale(xd, [M.left, width - M.right], xLog);
    const y = makeScale(yd, [height - M.bottom, M.top], yLog);
    const paths = shown.map((s) => {
      let bars = '';
      const points: [number, number][] = [];
      for (let i = 0; i < s.x.length; i++) {
        const xv = s.x[i];
        const yv = s.y[i];
        if (!usable(xv, xLog) || !usable(yv, yLog)) continue;
        const px = x(xv);
        const py = y(yv);
        const e = s.yError?.[i];
        if (e !== undefined && Number.isFinite(e) && e > 0) {
          // On a log axis the lower end may fall below zero: clip it to the frame.
          const lo = usable(yv - e, yLog) ? y(yv - e) : height - M.bottom;
          const hi = y(yv + e);
          bars += `M${px.toFixed(1)},${lo.toFixed(1)}V${hi.toFixed(1)}M${(px - 3).toFixed(1)},${lo.toFixed(1)}h6M${(px - 3).toFixed(1)},${hi.toFixed(1)}h6`;
        }
        points.push([px, py]);
      }
      // A missing or unplottable value (null, or ≤ 0 on a log axis) breaks the line into pieces.
      const pen = line<number>()
        .defined((i) => usable(s.x[i], xLog) && usable(s.y[i], yLog))
        .x((i) => x(s.x[i]))
        .y((i) => y(s.y[i] as number))
        .digits(1);
      const d = s.pointsOnly ? '' : (pen(Array.from({ length: s.x.length }, (_, i) => i)) ?? '');
      let marks = '';
      if (s.mark && points.length) {
        const every = s.pointsOnly ? 1 : Math.max(1, Math.ceil(points.length / MARKS_PER_SERIES));
        for (let k = 0; k < points.length; k += every) marks += markPath(s.mark, points[k][0], points[k][1]);
      }
      return { s, d, marks, bars };
    });
    const xt = x.ticks(width < 400 ? 4 : 6);
    const yt = y.ticks(5);
    return { x, y, paths, xt, yt };
  }, [series, shown, xLog, yLog, xDomain, yDomain, yFromZero, xFromZero, width, height]);

  const toggle = (s: PlotSeries) => setPicked((p) => ({ ...p, [s.id]: !isOn(s) }));
  const groups = [...new Set(series.map((s) => s.group ?? ''))];
  const entries = (list: PlotSeries[]) => list.map((s) => <LegendEntry key={s.id} s={s} on={isOn(s)} onToggle={() => toggle(s)} />);

  return (
    <View style={styles.wrap} testID={testID}>
      <Txt variant="caption" style={styles.yLabel}>
        {yLabel}
      </Txt>
      <View onLayout={onLayout} role="img" accessibilityLabel={accessibilityLabel} style={{ height }}>
        {plot ? (
          <Svg width={width} height={height}>
            <Axes plot={plot} width={width} height={height} xLabel={xLabel} xLog={xLog} yLog={yLog} />
            {markerX !== undefined && markerX >= plot.x.domain[0] && markerX <= plot.x.domain[1] ? (
              <Line x1={plot.x(markerX)} x2={plot.x(markerX)} y1={M.top} y2={height - M.bottom} stroke={colors.text} strokeOpacity={0.5} strokeDasharray="3 3" strokeWidth={1} />
            ) : null}
          </Svg>
        ) : (
          <View style={[styles.empty, { height }]}>
            <Txt variant="small">{emptyText ?? 'No data to plot yet'}</Txt>
          </View>
        )}
      </View>
      {series.length > 1 || (series.length === 1 && series[0].label) ? (
        <View style={styles.legend} role="group" accessibilityLabel="Legend: press an entry to show or hide its curve">
          {groups.length > 1 || groups[0] !== ''
            ? groups.map((g) => (
                <View key={g} style={styles.legendGroup} role="group" accessibilityLabel={g || 'other'}>
                  {g ? (
                    <Txt variant="caption" style={styles.groupTitle}>
                      {g}
                    </Txt>
                  ) : null}
                  <View style={styles.legendRow}>{entries(series.filter((s) => (s.group ?? '') === g))}</View>
                </View>
              ))
            : <View style={styles.legendRow}>{entries(series)}</View>}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  yLabel: { fontFamily: fonts.body },
  empty: { alignItems: 'center', justifyContent: 'center', borderWidth: 1, borderColor: colors.border, borderStyle: 'dashed', borderRadius: 8 },
  legend: { gap: space.sm, paddingLeft: space.sm },
  legendGroup: { gap: 2 },
  groupTitle: { fontFamily: fonts.bodySemi },
  legendRow: { flexDirection: 'row', flexWrap: 'wrap', columnGap: space.md, rowGap: 2 },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs, paddingVertical: 4, paddingHorizontal: 4, borderRadius: 6, minHeight: 28 },
  legendPressed: { backgroundColor: colors.surfaceRaised },
  off: { textDecorationLine: 'line-through' },
});
