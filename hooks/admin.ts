import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AccountUsage, AdminUser, AllocationBody, Role } from '../shared/api/accounts';
import { api, queryString } from '../components/lib/api';

export function useAdminUsers(q: string, role?: Role) {
  return useQuery({
    queryKey: ['admin', 'users', q, role],
    queryFn: ({ signal }) => api<{ users: AdminUser[] }>(`/api/admin/users${queryString({ q: q.trim() || undefined, role })}`, { signal }).then((r) => r.users),
  });
}

export function useAdminUser(id: number | null) {
  return useQuery({ queryKey: ['admin', 'user', id], enabled: Boolean(id), queryFn: ({ signal }) => api<{ user: AdminUser; usage: AccountUsage }>(`/api/admin/users/${id}`, { signal }) });
}

function useAdminWrite<T, R>(fn: (input: T) => Promise<R>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: ['admin'] }) });
}

export const useGrantRole = (id: number) => useAdminWrite((role: Role) => api<{ user: AdminUser }>(`/api/admin/users/${id}`, { method: 'PATCH', body: { role } }));
export const useSetAllocation = (id: number) => useAdminWrite((body: AllocationBody) => api<{ user: AdminUser }>(`/api/admin/users/${id}/allocation`, { method: 'PUT', body }));
