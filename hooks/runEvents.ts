import { useEffect, useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import type { RunDetail, RunProgress, RunSummary } from '../shared/api/contract';
import { API_BASE } from '../components/lib/api';
import { runKeys } from './runs';

export type StreamState = 'idle' | 'connecting' | 'open' | 'ended' | 'reconnecting';

export interface DriftSample {
  step: number;
  time_Myr: number;
  energyDrift: number | null;
}

export interface RunStream {
  state: StreamState;
  progress: RunProgress | null;
  /** Every progress sample of the run so far (from t = 0, even when the page opened mid-run), for the live drift plot. */
  drift: DriftSample[];
}

const MAX_SAMPLES = 2000; // plenty for a live plot; older samples are thinned out

function thin(samples: DriftSample[]): DriftSample[] {
  while (samples.length > MAX_SAMPLES) samples = samples.filter((_, i) => i % 2 === 0 || i === samples.length - 1);
  return samples;
}

const sample = (p: RunProgress): DriftSample => ({ step: p.step, time_Myr: p.time_Myr, energyDrift: p.energyDrift });

/** Samples from before the page opened and those seen live, one per step, in step order. */
function merge(earlier: RunProgress[], seen: DriftSample[]): DriftSample[] {
  const byStep = new Map<number, DriftSample>();
  for (const p of earlier) byStep.set(p.step, sample(p));
  for (const d of seen) byStep.set(d.step, d);
  return thin([...byStep.values()].sort((a, b) => a.step - b.step));
}

/**
 * Follows a run's server-sent events while it is queued or running: keeps the cached
 * run summary current, collects progress samples, and refetches the detail at the end.
 */
export function useRunEvents(id: string | undefined, enabled: boolean): RunStream {
  const qc = useQueryClient();
  const [stream, setStream] = useState<RunStream>({ state: 'idle', progress: null, drift: [] });
  const ended = useRef(false);

  useEffect(() => {
    if (!id || !enabled || typeof EventSource === 'undefined') return;
    ended.current = false;
    setStream((s) => ({ ...s, state: 'connecting' }));
    const source = new EventSource(`${API_BASE}/api/runs/${id}/events`, { withCredentials: true });

    source.onopen = () => setStream((s) => ({ ...s, state: 'open' }));
    source.onerror = () => {
      // EventSource reconnects by itself; after `end` the closed stream is expected.
      if (!ended.current) setStream((s) => ({ ...s, state: 'reconnecting' }));
    };
    source.addEventListener('state', (ev) => {
      const summary = JSON.parse((ev as MessageEvent).data) as RunSummary;
      qc.setQueryData<RunDetail>(runKeys.detail(id), (old) => (old ? { ...old, ...summary } : old));
    });
    source.addEventListener('history', (ev) => {
      const earlier = JSON.parse((ev as MessageEvent).data) as RunProgress[];
      setStream((s) => ({ ...s, progress: s.progress ?? earlier[earlier.length - 1] ?? null, drift: merge(earlier, s.drift) }));
    });
    source.addEventListener('progress', (ev) => {
      const p = JSON.parse((ev as MessageEvent).data) as RunProgress;
      setStream((s) => {
        const last = s.drift[s.drift.length - 1];
        const drift = last && last.step >= p.step ? s.drift : thin([...s.drift, sample(p)]);
        return { state: 'open', progress: p, drift };
      });
      qc.setQueryData<RunDetail>(runKeys.detail(id), (old) =>
        old ? { ...old, status: 'running', progress: Math.max(old.progress, p.percent / 100) } : old,
      );
    });
    source.addEventListener('end', () => {
      ended.current = true;
      source.close();
      setStream((s) => ({ ...s, state: 'ended' }));
      void qc.invalidateQueries({ queryKey: runKeys.detail(id) });
      void qc.invalidateQueries({ queryKey: ['runs', 'list'] });
      void qc.invalidateQueries({ queryKey: ['usage'] });
    });
    return () => {
      ended.current = true;
      source.close();
    };
  }, [id, enabled, qc]);

  return stream;
}
