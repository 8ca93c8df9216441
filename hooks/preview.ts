import { useDeferredValue, useEffect, useMemo, useRef, useState } from 'react';
import { computePreview, type Preview, type PreviewAnswer, type PreviewRequest } from '../components/launch/preview';
import type { RunSpec } from '../shared/spec';

declare global {
  // Merges into the bundler's own typing of require.
  namespace NodeJS {
    interface Require {
      /** Expo's bundler names a web worker's own bundle this way (it splits the worker's code out). */
      unstable_resolveWorker(id: string): string;
    }
  }
}

/** The preview worker, or null where there is none: no Worker (native, the test DOM) or a bundle that cannot start one. */
function startWorker(): Worker | null {
  if (typeof Worker === 'undefined') return null;
  try {
    return new Worker(require.unstable_resolveWorker('../components/launch/previewWorker'));
  } catch {
    return null;
  }
}

/**
 * The new-run form's preview of a valid spec (null otherwise). On the web it is computed in a
 * worker, one draft at a time: while one computes, only the newest draft waits, and an answer to a
 * draft the form has moved past is dropped, so typing never waits on the engine and the panels show
 * the last answer until the next. Without a worker it is computed in place, a beat behind typing.
 */
export function usePreview(spec: RunSpec | null, pair: RunSpec | null): Preview | null {
  const [inPlace, setInPlace] = useState(() => typeof Worker === 'undefined');
  const [answer, setAnswer] = useState<Preview | null>(null);
  const worker = useRef<Worker | null>(null);
  const busy = useRef(false);
  const waiting = useRef<PreviewRequest | null>(null);
  const newest = useRef(0);

  // Sends the waiting draft if the worker is free; refs only, so any render's copy will do.
  const sendWaiting = () => {
    const w = worker.current, r = waiting.current;
    if (!w || busy.current || !r) return;
    waiting.current = null;
    busy.current = true;
    w.postMessage(r);
  };

  useEffect(() => {
    if (inPlace) return;
    const w = startWorker();
    if (!w) {
      setInPlace(true);
      return;
    }
    worker.current = w;
    busy.current = false;
    w.onmessage = ({ data }: MessageEvent<PreviewAnswer>) => {
      busy.current = false;
      if (waiting.current) sendWaiting();
      else if (data.id === newest.current) setAnswer(data.preview);
    };
    // A worker script that cannot load (or dies) leaves the preview to the main thread.
    w.onerror = () => {
      w.terminate();
      worker.current = null;
      setInPlace(true);
    };
    sendWaiting();
    return () => {
      w.terminate();
      worker.current = null;
    };
  }, [inPlace]);

  useEffect(() => {
    if (inPlace || !spec) return;
    waiting.current = { id: ++newest.current, spec, pair };
    sendWaiting();
  }, [inPlace, spec, pair]);

  const deferredSpec = useDeferredValue(spec);
  const deferredPair = useDeferredValue(pair);
  const here = useMemo(() => (inPlace && deferredSpec ? computePreview(deferredSpec, deferredPair) : null), [inPlace, deferredSpec, deferredPair]);

  if (!spec) return null;
  return inPlace ? here : answer;
}
