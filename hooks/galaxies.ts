import { useMutation, useQueries, useQuery, useQueryClient } from '@tanstack/react-query';
import type { RunSummary } from '../shared/api/contract';
import type { GalaxyDetail, GalaxyFitRecord, GalaxyFitRequest, GalaxyList, GalaxyRunRequest, GalaxySampleRecord, GalaxySampleRequest, GalaxySampleSummary, GalaxyMapping, GalaxySummary, GalaxyVisibility, UpdateGalaxyBody } from '../shared/api/galaxies';
import type { ParticleTableUpload } from '../shared/api/particleTable';
import { api } from '../components/lib/api';

const keys = {
  list: ['galaxies'] as const,
  one: (id: number) => ['galaxies', id] as const,
};

export function useGalaxies() {
  return useQuery({ queryKey: keys.list, queryFn: ({ signal }) => api<GalaxyList>('/api/galaxies', { signal }) });
}

export function useGalaxy(id: number) {
  return useQuery({ queryKey: keys.one(id), enabled: id > 0, queryFn: ({ signal }) => api<GalaxyDetail>(`/api/galaxies/${id}`, { signal }) });
}

/** Several galaxies at once (the acceleration relation of a selection). */
export function useGalaxySelection(ids: number[]) {
  return useQueries({ queries: ids.map((id) => ({ queryKey: keys.one(id), queryFn: ({ signal }: { signal: AbortSignal }) => api<GalaxyDetail>(`/api/galaxies/${id}`, { signal }) })) });
}

export function useFitGalaxy(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: GalaxyFitRequest) => api<GalaxyFitRecord>(`/api/galaxies/${id}/fits`, { method: 'POST', body }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: keys.one(id) }),
  });
}

/** A pair of runs built from the galaxy's Newtonian fit (the server builds the specs). */
export function useRunsFromGalaxy(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: GalaxyRunRequest) => api<{ runs: RunSummary[] }>(`/api/galaxies/${id}/runs`, { method: 'POST', body }),
    onSuccess: () => void qc.invalidateQueries({ queryKey: ['runs'] }),
  });
}

export function useSampleFits() {
  return useQuery({ queryKey: ['galaxy-samples'], queryFn: ({ signal }) => api<{ samples: GalaxySampleSummary[] }>('/api/galaxy-samples', { signal }) });
}

export function useSampleFit(id: number) {
  return useQuery({ queryKey: ['galaxy-samples', id], enabled: id > 0, queryFn: ({ signal }) => api<GalaxySampleRecord>(`/api/galaxy-samples/${id}`, { signal }) });
}

/** One joint fit across the chosen galaxies; the answer is kept as the sample's page data. */
export function useFitSample() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: GalaxySampleRequest) => api<GalaxySampleRecord>('/api/galaxy-samples', { method: 'POST', body }),
    onSuccess: (r) => {
      qc.setQueryData(['galaxy-samples', r.id], r);
      void qc.invalidateQueries({ queryKey: ['galaxy-samples'], exact: true });
    },
  });
}

export interface UploadInput {
  file: { name: string; blob: Blob };
  name: string;
  mapping: GalaxyMapping;
  visibility: GalaxyVisibility;
  cohortId?: number;
}

export function useUploadGalaxy() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ file, name, mapping, visibility, cohortId }: UploadInput) => {
      const form = new FormData();
      form.append('name', name);
      form.append('mapping', JSON.stringify(mapping));
      form.append('visibility', visibility);
      if (cohortId !== undefined) form.append('cohortId', String(cohortId));
      form.append('file', file.blob, file.name);
      return api<GalaxyDetail>('/api/galaxies', { method: 'POST', body: form });
    },
    onSuccess: (g) => {
      qc.setQueryData(keys.one(g.id), g);
      void qc.invalidateQueries({ queryKey: keys.list });
    },
  });
}

export function useUpdateGalaxy(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateGalaxyBody) => api<GalaxySummary>(`/api/galaxies/${id}`, { method: 'PATCH', body }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: keys.one(id) });
      void qc.invalidateQueries({ queryKey: keys.list });
    },
  });
}

/** Sends a particle table through the upload path; the server reads it and answers with the particles. */
export function useParticleTableUpload() {
  return useMutation({
    mutationFn: (file: { name: string; blob: Blob }) => {
      const form = new FormData();
      form.append('file', file.blob, file.name);
      return api<ParticleTableUpload>('/api/particle-tables', { method: 'POST', body: form });
    },
  });
}

export function useDeleteGalaxy(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<void>(`/api/galaxies/${id}`, { method: 'DELETE' }),
    onSuccess: () => {
      qc.removeQueries({ queryKey: keys.one(id) });
      void qc.invalidateQueries({ queryKey: keys.list });
    },
  });
}
