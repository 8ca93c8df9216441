import { useMemo } from 'react';
import { usePlayhead } from './playback';
import { useSnapshots } from './runs';

/** A run's snapshots with a playhead over them, for a player and the plots that follow it. */
export function useRunPlayback(runId: string | undefined, enabled: boolean) {
  const snaps = useSnapshots(runId, enabled);
  const frames = useMemo(() => snaps.data?.frames ?? [], [snaps.data]);
  const times = useMemo(() => frames.map((f) => f.time_Myr), [frames]);
  const playhead = usePlayhead(times);
  return { snaps, frames, parts: snaps.data, times, playhead };
}
