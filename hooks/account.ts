import { useQuery } from '@tanstack/react-query';
import { api } from './api';

export interface Usage {
  limits: { maxParticles: number; maxSteps: number; maxConcurrentRuns: number; dailyInteractions: number };
  used: { interactionsToday: number; activeRuns: number };
  remaining: { interactionsToday: number; concurrentRuns: number };
}

export function useUsage() {
  return useQuery({
    queryKey: ['usage'],
    queryFn: ({ signal }) => api<Usage>('/api/account/usage', { signal }),
    staleTime: 15_000,
  });
}
