import { useMemo } from 'react';
import { curvesAtFrame, type CurveSource } from '../../hooks/frameCurve';
import { useFrameTime, type Playhead } from '../../hooks/playback';
import type { PlottedRun } from './DiagnosticsPlots';
import { RotationCurvePlot } from './RotationCurvePlot';

/** The rotation-curve panel following the snapshot on screen (re-measured once per snapshot). */
export function RotationAtPlayhead({ runs, sources, playhead, times }: { runs: PlottedRun[]; sources: CurveSource[]; playhead: Playhead; times: number[] }) {
  const t = useFrameTime(playhead, times);
  const atFrame = useMemo(() => curvesAtFrame(sources, t), [sources, t]);
  return <RotationCurvePlot runs={runs} atFrame={atFrame} />;
}
