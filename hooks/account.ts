import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AccountSettings, AccountUsage, CreateTokenBody, CreatedToken, TokenSummary } from '../shared/api/accounts';
import { api } from '../components/lib/api';

export type Usage = AccountUsage;

export function useUsage() {
  return useQuery({
    queryKey: ['usage'],
    queryFn: ({ signal }) => api<AccountUsage>('/api/account/usage', { signal }),
    staleTime: 15_000,
  });
}

export function useAccountSettings() {
  return useQuery({ queryKey: ['account'], queryFn: ({ signal }) => api<AccountSettings>('/api/account', { signal }) });
}

export function useUpdateAccount() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: { notifyOnFinish: boolean }) => api<AccountSettings>('/api/account', { method: 'PATCH', body }),
    onSuccess: (settings) => qc.setQueryData(['account'], settings),
  });
}

export function useTokens() {
  return useQuery({ queryKey: ['tokens'], queryFn: ({ signal }) => api<{ tokens: TokenSummary[] }>('/api/tokens', { signal }).then((r) => r.tokens) });
}

export function useCreateToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateTokenBody) => api<CreatedToken>('/api/tokens', { method: 'POST', body }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['tokens'] }),
  });
}

export function useRevokeToken() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api<void>(`/api/tokens/${id}`, { method: 'DELETE' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['tokens'] }),
  });
}
