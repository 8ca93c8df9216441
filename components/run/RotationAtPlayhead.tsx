import { useMemo, useRef } from 'react';
import { curvesAtFrame, type CurveSource } from '../lib/frameCurve';
import { useFrameTime, usePlayheadValue } from '../../hooks/playback';
import type { Playhead } from '../lib/playhead';
import type { PlottedRun } from './DiagnosticsPlots';
import { RotationCurvePlot } from './RotationCurvePlot';

/**
 * The rotation-curve panel following the snapshot on screen. Measuring a snapshot's field
 * takes milliseconds, so while the animation plays the curve holds and it is re-measured
 * when playback pauses or someone steps or scrubs.
 */
export function RotationAtPlayhead({ runs, sources, playhead, times }: { runs: PlottedRun[]; sources: CurveSource[]; playhead: Playhead; times: number[] }) {
  const t = useFrameTime(playhead, times);
  const playing = usePlayheadValue(playhead, (p) => p.playing);
  const held = useRef<number | undefined>(undefined);
  if (!playing || held.current === undefined) held.current = t;
  const shown = held.current;
  const atFrame = useMemo(() => curvesAtFrame(sources, shown), [sources, shown]);
  return <RotationCurvePlot runs={runs} atFrame={atFrame} />;
}
