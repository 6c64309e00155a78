// The signed-in session: who is signed in and the permission rules for the client.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { ApiError, api, setCsrfToken } from './client';
import type { SessionInfo } from './types';

export const sessionKeys = {
  all: ['session'] as const,
};

/** GET /api/session; a 401 means "nobody signed in" and resolves to null rather than an error. */
export async function fetchSession(): Promise<SessionInfo | null> {
  try {
    const s = await api<SessionInfo>('GET', '/api/session');
    setCsrfToken(s.csrfToken);
    return s;
  } catch (e) {
    if (e instanceof ApiError && e.status === 401) return null;
    throw e;
  }
}

export function useSession() {
  return useQuery({
    queryKey: sessionKeys.all,
    queryFn: fetchSession,
    staleTime: 60_000,
    retry: (count, error) => !(error instanceof ApiError && error.status < 500) && count < 2,
  });
}

export function useSignIn() {
  const qc = useQueryClient();
  return useMutation({
    mutationKey: ['sign-in'],
    mutationFn: (input: { email: string; password: string }) => api<SessionInfo>('POST', '/api/session', input),
    onSuccess: (s) => {
      setCsrfToken(s.csrfToken);
      // Nothing cached belongs to the previous visitor.
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
      qc.setQueryData(sessionKeys.all, s);
    },
  });
}

export function useSignOut() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async () => {
      // A session request still in flight must not bring the old session back afterwards.
      await qc.cancelQueries({ queryKey: sessionKeys.all });
      await api<void>('DELETE', '/api/session');
    },
    onSettled: () => {
      // Forget the session in place (observers stay attached) and drop everything else cached.
      qc.setQueryData(sessionKeys.all, null);
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.all[0] });
    },
  });
}
