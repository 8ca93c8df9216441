import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AccountUser, SessionResponse } from '../shared/api/accounts';
import { api, ApiError, setCsrfToken } from '../components/lib/api';

export type SessionUser = AccountUser;

export const sessionKey = ['session'] as const;

/**
 * The signed-in user, or null when nobody is signed in: the probe answers 200 either way, so
 * a signed-out page load logs no failed request. Also keeps the CSRF token that every write sends.
 */
export function useSession() {
  return useQuery({
    queryKey: sessionKey,
    queryFn: async (): Promise<SessionUser | null> => {
      const me = await api<SessionResponse>('/api/auth/session');
      setCsrfToken(me.csrfToken);
      return me.user;
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
