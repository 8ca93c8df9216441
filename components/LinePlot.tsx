import { memo, useMemo, useState } from 'react';
import { StyleSheet, View, type LayoutChangeEvent } from 'react-native';
import Svg, { G, Line, Path, Text as SvgText } from 'react-native-svg';
import { colors, fonts, space } from '../constants/theme';
import { formatTick, makeScale, niceDomain, type Scale } from './plot/scale';
import { Txt } from './Txt';

export interface PlotSeries {
  id: string;
  label: string;
  color: string;
  x: ArrayLike<number>;
  /** null leaves a gap (e.g. a law without an energy). */
  y: ArrayLike<number | null>;
  dashed?: boolean;
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
  /** A vertical guide, e.g. the time of the frame on screen. */
  markerX?: number;
  /** Spoken summary of what the plot shows. */
  accessibilityLabel: string;
  emptyText?: string;
  testID?: string;
}

const M = { top: 8, right: 14, bottom: 34, left: 58 };

function usable(v: number | null | undefined, log: boolean): v is number {
  return v !== null && v !== undefined && Number.isFinite(v) && (!log || v > 0);
}

function extent(series: PlotSeries[], axis: 'x' | 'y', log: boolean): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) {
    const arr = s[axis];
    for (let i = 0; i < arr.length; i++) {
      const v = arr[i];
      if (usable(v, log) && usable(axis === 'x' ? s.y[i] : s.x[i], false)) {
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
    }
  }
  return [lo, hi];
}

interface PlotGeometry {
  x: Scale;
  y: Scale;
  paths: { s: PlotSeries; d: string }[];
  xt: number[];
  yt: number[];
}

/** Grid, ticks and lines: memoised, so a moving marker does not redraw them. */
const Axes = memo(function Axes({ plot, width, height, xLabel, xLog, yLog }: { plot: PlotGeometry; width: number; height: number; xLabel: string; xLog: boolean; yLog: boolean }) {
  return (
    <G>
      {plot.yt.map((t) => (
        <G key={`y${t}`}>
          <Line x1={M.left} x2={width - M.right} y1={plot.y(t)} y2={plot.y(t)} stroke={colors.border} strokeWidth={1} />
          <SvgText x={M.left - 6} y={plot.y(t) + 4} fill={colors.textMuted} fontSize={10} fontFamily={fonts.mono} textAnchor="end">
            {formatTick(t, plot.yt, yLog)}
          </SvgText>
        </G>
      ))}
      {plot.xt.map((t) => (
        <G key={`x${t}`}>
          <Line x1={plot.x(t)} x2={plot.x(t)} y1={height - M.bottom} y2={height - M.bottom + 4} stroke={colors.borderStrong} strokeWidth={1} />
          <SvgText x={plot.x(t)} y={height - M.bottom + 16} fill={colors.textMuted} fontSize={10} fontFamily={fonts.mono} textAnchor="middle">
            {formatTick(t, plot.xt, xLog)}
          </SvgText>
        </G>
      ))}
      <Line x1={M.left} x2={width - M.right} y1={height - M.bottom} y2={height - M.bottom} stroke={colors.borderStrong} strokeWidth={1} />
      <Line x1={M.left} x2={M.left} y1={M.top} y2={height - M.bottom} stroke={colors.borderStrong} strokeWidth={1} />
      {plot.paths.map(({ s, d }) => (
        <Path key={s.id} d={d} stroke={s.color} strokeWidth={2} fill="none" strokeDasharray={s.dashed ? '6 4' : undefined} strokeLinejoin="round" />
      ))}
      <SvgText x={(M.left + width - M.right) / 2} y={height - 4} fill={colors.textMuted} fontSize={11} fontFamily={fonts.body} textAnchor="middle">
        {xLabel}
      </SvgText>
    </G>
  );
});

/** A line plot with axes, units, ticks and a legend; linear or log on either axis. */
export function LinePlot({ series, xLabel, yLabel, xLog = false, yLog = false, height = 220, xDomain, yDomain, yFromZero = false, markerX, accessibilityLabel, emptyText, testID }: LinePlotProps) {
  const [width, setWidth] = useState(320);
  const onLayout = (e: LayoutChangeEvent) => {
    const w = Math.round(e.nativeEvent.layout.width);
    if (w > 0 && w !== width) setWidth(w);
  };

  const plot = useMemo((): PlotGeometry | null => {
    const [xl, xh] = xDomain ?? extent(series, 'x', xLog);
    const [yl, yh] = yDomain ?? extent(series, 'y', yLog);
    if (!Number.isFinite(xl) || !Number.isFinite(yl)) return null;
    const xd = xDomain ?? niceDomain(xl, xh, xLog);
    const yd = yDomain ?? niceDomain(yFromZero && !yLog ? Math.min(0, yl) : yl, yh, yLog);
    const x = makeScale(xd, [M.left, width - M.right], xLog);
    const y = makeScale(yd, [height - M.bottom, M.top], yLog);
    const paths = series.map((s) => {
      let d = '';
      let pen = false;
      for (let i = 0; i < s.x.length; i++) {
        const xv = s.x[i];
        const yv = s.y[i];
        if (!usable(xv, xLog) || !usable(yv, yLog)) {
          pen = false;
          continue;
        }
        d += `${pen ? 'L' : 'M'}${x(xv).toFixed(1)},${y(yv).toFixed(1)}`;
        pen = true;
      }
      return { s, d };
    });
    const xt = x.ticks(width < 400 ? 4 : 6);
    const yt = y.ticks(5);
    return { x, y, paths, xt, yt };
  }, [series, xLog, yLog, xDomain, yDomain, yFromZero, width, height]);

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
        <View style={styles.legend} role="list" accessibilityLabel="Legend">
          {series.map((s) => (
            <View key={s.id} style={styles.legendItem} role="note" accessibilityLabel={`${s.label}${s.dashed ? ', dashed line' : ''}`}>
              <View style={[styles.swatch, { backgroundColor: s.dashed ? 'transparent' : s.color, borderColor: s.color }, s.dashed && styles.swatchDashed]} />
              <Txt variant="caption" color={colors.text}>
                {s.label}
              </Txt>
            </View>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: space.xs },
  yLabel: { fontFamily: fonts.body },
  empty: { alignItems: 'center', justifyContent: 'center', borderWidth: 1, borderColor: colors.border, borderStyle: 'dashed', borderRadius: 8 },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: space.md, paddingLeft: M.left },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: space.xs },
  swatch: { width: 16, height: 3, borderRadius: 2, borderWidth: 1 },
  swatchDashed: { borderStyle: 'dashed', height: 0, borderWidth: 1.5 },
});
