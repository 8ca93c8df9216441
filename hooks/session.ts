import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AccountUser, MeResponse } from '../shared/api/accounts';
import { api, ApiError, setCsrfToken } from './api';

export type SessionUser = AccountUser;

export const sessionKey = ['session'] as const;

/**
 * The signed-in user, or null when nobody is signed in (401 is an answer here, not an error).
 * Also keeps the CSRF token that every write sends.
 */
export function useSession() {
  return useQuery({
    queryKey: sessionKey,
    queryFn: async (): Promise<SessionUser | null> => {
      try {
        const me = await api<MeResponse>('/api/auth/me');
        setCsrfToken(me.csrfToken);
        return me.user;
      } catch (e) {
        if (e instanceof ApiError && e.status === 401) {
          setCsrfToken(null);
          return null;
        }
        throw e;
      }
    },
    staleTime: 60_000,
    retry: (count, e) => !(e instanceof ApiError && e.status < 500) && count < 2,
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<void>('/api/auth/signout', { method: 'POST' }),
    onSettled: () => {
      setCsrfToken(null);
      qc.clear();
      qc.setQueryData(sessionKey, null);
    },
  });
}

export const isStaff = (u: SessionUser | null | undefined) => u?.role === 'instructor' || u?.role === 'admin';
export const isAdmin = (u: SessionUser | null | undefined) => u?.role === 'admin';
