import { useEffect, useRef, useSyncExternalStore } from 'react';
import { locateFrame, Playhead } from '../components/lib/playhead';

/** One playhead for the lifetime of a screen, following the given snapshot times. */
export function usePlayhead(times: readonly number[]): Playhead {
  const ref = useRef<Playhead | null>(null);
  if (!ref.current) ref.current = new Playhead();
  const ph = ref.current;
  useEffect(() => {
    ph.setTimes(times);
  }, [ph, times]);
  useEffect(() => () => ph.dispose(), [ph]);
  return ph;
}

/** Reads from the playhead and re-renders when that reading changes. */
export function usePlayheadValue<T>(ph: Playhead, read: (ph: Playhead) => T): T {
  return useSyncExternalStore(
    ph.subscribe,
    () => read(ph),
    () => read(ph),
  );
}

/** The time of the snapshot on screen; changes once per snapshot, not once per animation frame. */
export function useFrameTime(ph: Playhead, times: readonly number[]): number | undefined {
  const index = usePlayheadValue(ph, (p) => locateFrame(times, p.time).index);
  return times.length ? times[index] : undefined;
}
