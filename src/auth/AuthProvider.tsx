// Provides the signed-in user and the CASL ability built from the rules the server sent.
// The ability comes from the one definition in shared/abilities.ts (abilityFromRules), so
// the client shows exactly what the server will allow.
import { createContext, useContext, useMemo, type ReactNode } from 'react';
import { AbilityProvider } from '@casl/react';
import { abilityFromRules } from '../../shared/abilities';
import { useSession } from '../api/session';
import type { SessionInfo, SessionUser } from '../api/types';

type AuthState = {
  /** undefined while the first session request is in flight; null when nobody is signed in. */
  session: SessionInfo | null | undefined;
  user: SessionUser | null;
  isLoading: boolean;
  error: unknown;
  refetch: () => void;
};

const AuthContext = createContext<AuthState | null>(null);

export function AuthProvider({ children }: { children: ReactNode }) {
  const q = useSession();
  const session = q.data;
  const rules = session?.rules;
  const ability = useMemo(() => abilityFromRules(rules ?? []), [rules]);
  const state = useMemo<AuthState>(
    () => ({
      session,
      user: session?.user ?? null,
      isLoading: q.isPending,
      error: q.error,
      refetch: () => void q.refetch(),
    }),
    // q.refetch is stable; q.error and q.isPending change with the query state.
    // eslint-disable-next-line react-hooks/exhaustive-deps
    [session, q.isPending, q.error],
  );
  return (
    <AuthContext.Provider value={state}>
      <AbilityProvider value={ability}>{children}</AbilityProvider>
    </AuthContext.Provider>
  );
}

export function useAuth(): AuthState {
  const ctx = useContext(AuthContext);
  if (!ctx) throw new Error('useAuth must be used inside <AuthProvider>');
  return ctx;
}
