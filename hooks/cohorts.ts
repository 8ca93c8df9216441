import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CohortMemberUsage, CohortSummary, QuotaLimits, TemplateDetail, TemplateSummary } from '../shared/api/accounts';
import type { RunDetail, RunSummary } from '../shared/api/contract';
import { api, queryString } from '../components/lib/api';

const keys = {
  list: ['cohorts'] as const,
  one: (id: number) => ['cohorts', id] as const,
  members: (id: number) => ['cohorts', id, 'members'] as const,
  templates: (id: number) => ['cohorts', id, 'templates'] as const,
};

export function useCohorts(enabled = true) {
  return useQuery({ queryKey: keys.list, enabled, queryFn: ({ signal }) => api<{ cohorts: CohortSummary[] }>('/api/cohorts', { signal }).then((r) => r.cohorts) });
}

export function useCohort(id: number) {
  return useQuery({ queryKey: keys.one(id), enabled: id > 0, queryFn: ({ signal }) => api<{ cohort: CohortSummary }>(`/api/cohorts/${id}`, { signal }).then((r) => r.cohort) });
}

export function useCohortMembers(id: number, enabled: boolean) {
  return useQuery({ queryKey: keys.members(id), enabled: id > 0 && enabled, queryFn: ({ signal }) => api<{ members: CohortMemberUsage[] }>(`/api/cohorts/${id}/members`, { signal }).then((r) => r.members) });
}

export function useCohortTemplates(id: number) {
  return useQuery({ queryKey: keys.templates(id), enabled: id > 0, queryFn: ({ signal }) => api<{ templates: TemplateSummary[] }>(`/api/cohorts/${id}/templates`, { signal }).then((r) => r.templates) });
}

function useCohortWrite<T, R>(fn: (input: T) => Promise<R>, id?: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: id ? keys.one(id) : keys.list });
      void qc.invalidateQueries({ queryKey: keys.list });
      void qc.invalidateQueries({ queryKey: ['usage'] });
    },
  });
}

export const useCreateCohort = () => useCohortWrite((body: { name: string; quota?: QuotaLimits }) => api<{ cohort: CohortSummary }>('/api/cohorts', { method: 'POST', body }));
export const useJoinCohort = () => useCohortWrite((code: string) => api<{ cohort: CohortSummary }>('/api/cohorts/join', { method: 'POST', body: { code } }));
export const useSetCohortQuota = (id: number) => useCohortWrite((quota: QuotaLimits) => api<{ cohort: CohortSummary }>(`/api/cohorts/${id}/quota`, { method: 'PUT', body: quota }), id);
export const useNewEnrolmentCode = (id: number) => useCohortWrite(() => api<{ cohort: CohortSummary }>(`/api/cohorts/${id}/code`, { method: 'POST' }), id);
export const useInvite = (id: number) => useCohortWrite((emails: string[]) => api<{ sent: number }>(`/api/cohorts/${id}/invitations`, { method: 'POST', body: { emails } }), id);

/** Publishes a run's spec as a cohort template; a run of a pair brings its twin's law as the pair law. */
export function usePublishFromRun(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async ({ runId, name, description }: { runId: string; name: string; description: string }) => {
      const run = await api<RunDetail>(`/api/runs/${runId}`);
      let pairLaw: unknown;
      if (run.pairId) {
        const { runs } = await api<{ runs: RunSummary[] }>(`/api/runs${queryString({ pair: run.pairId })}`);
        const twin = runs.find((r) => r.id !== run.id);
        if (twin) pairLaw = ((await api<RunDetail>(`/api/runs/${twin.id}`)).spec as { law: unknown }).law;
      }
      return api<{ template: TemplateDetail }>(`/api/cohorts/${id}/templates`, { method: 'POST', body: { name, description, spec: run.spec, ...(pairLaw ? { pairLaw } : {}) } });
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: keys.templates(id) }),
  });
}

export function useTemplates() {
  return useQuery({ queryKey: ['templates'], queryFn: ({ signal }) => api<{ templates: TemplateSummary[] }>('/api/templates', { signal }).then((r) => r.templates) });
}

export function useTemplate(id: number | undefined) {
  return useQuery({ queryKey: ['templates', id], enabled: Boolean(id), queryFn: ({ signal }) => api<{ template: TemplateDetail }>(`/api/templates/${id}`, { signal }).then((r) => r.template) });
}

export function useDeleteTemplate() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api<void>(`/api/templates/${id}`, { method: 'DELETE' }),
    onSuccess: () => {
      void qc.invalidateQueries({ queryKey: ['templates'] });
      void qc.invalidateQueries({ queryKey: keys.list });
    },
  });
}
