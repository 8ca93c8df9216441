import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { RunDetail, RunStatus, RunSummary } from '../shared/api/contract';
import { decodeSnapshots, SNAPSHOT_WIRE_FORMAT, type SnapshotSet } from '../shared/api/snapshots';
import { api, queryString } from '../components/lib/api';
import { isFinal } from '../components/lib/runStatus';

export interface RunFilters {
  status?: RunStatus;
  law?: string;
  cohort?: number;
  pair?: string;
}

export const runKeys = {
  all: ['runs'] as const,
  list: (f: RunFilters) => ['runs', 'list', f] as const,
  detail: (id: string) => ['runs', 'detail', id] as const,
  snapshots: (id: string) => ['runs', 'snapshots', id] as const,
};

export function useRuns(filters: RunFilters = {}) {
  return useQuery({
    queryKey: runKeys.list(filters),
    queryFn: ({ signal }) => api<{ runs: RunSummary[] }>(`/api/runs${queryString({ ...filters })}`, { signal }).then((r) => r.runs),
    // Lists with unfinished runs refresh themselves; the run page uses events instead.
    refetchInterval: (q) => (q.state.data?.some((r) => !isFinal(r.status)) ? 5000 : false),
  });
}

export function useRun(id: string | undefined) {
  return useQuery({
    queryKey: runKeys.detail(id ?? ''),
    enabled: Boolean(id),
    queryFn: ({ signal }) => api<RunDetail>(`/api/runs/${id}`, { signal }),
  });
}

/** The decoded snapshot frames of a run; only fetched once the run has output. */
export function useSnapshots(id: string | undefined, enabled: boolean) {
  return useQuery({
    queryKey: runKeys.snapshots(id ?? ''),
    enabled: Boolean(id) && enabled,
    staleTime: Infinity, // a finished run's frames never change
    queryFn: async ({ signal }): Promise<SnapshotSet> => decodeSnapshots(await api<Uint8Array>(`/api/runs/${id}/snapshots?format=${SNAPSHOT_WIRE_FORMAT}`, { signal, as: 'bytes' })),
  });
}

export interface SubmitRunInput {
  name?: string;
  spec: unknown;
  pairLaw?: unknown;
}

export function useSubmitRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: SubmitRunInput) => api<{ runs: RunSummary[] }>('/api/runs', { method: 'POST', body }).then((r) => r.runs),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: runKeys.all });
      void qc.invalidateQueries({ queryKey: ['usage'] });
    },
  });
}

export function useCancelRun(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<RunSummary>(`/api/runs/${id}/cancel`, { method: 'POST' }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: runKeys.all });
      void qc.invalidateQueries({ queryKey: ['usage'] });
    },
  });
}

/** Carries a finished run on by `more_Myr` from its last state. */
export function useExtendRun(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (more_Myr: number) => api<RunSummary>(`/api/runs/${id}/extend`, { method: 'POST', body: { more_Myr } }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: runKeys.all });
      void qc.invalidateQueries({ queryKey: ['usage'] });
    },
  });
}
