// Route guards: signed-in only, and permitted-by-ability only.
import type { ReactNode } from 'react';
import { Navigate, Outlet, useLocation } from 'react-router';
import { ErrorState, LoadingState } from '../components/ui';
import { useAuth } from './AuthProvider';
import type { AbilityAction, AbilitySubject } from './areas';
import { useAppAbility } from './useAppAbility';

export function RequireSignIn() {
  const { session, isLoading, error, refetch } = useAuth();
  const location = useLocation();
  if (isLoading) return <LoadingState label="Checking your session…" />;
  if (error && session === undefined) return <ErrorState error={error} onRetry={refetch} title="Tocsin could not check your session" />;
  if (!session) {
    const next = location.pathname + location.search + location.hash;
    return <Navigate to={next === '/' ? '/sign-in' : `/sign-in?next=${encodeURIComponent(next)}`} replace />;
  }
  return <Outlet />;
}

export function RequireAbility({ action, subject, children }: { action: AbilityAction; subject: AbilitySubject; children: ReactNode }) {
  const ability = useAppAbility();
  if (!ability.can(action, subject)) {
    return (
      <div className="max-w-xl">
        <h1 className="text-2xl font-bold">Not available to your role</h1>
        <p className="mt-3 text-ink-soft">
          Your account does not give access to this page. If you need it, ask an administrator of your office.
        </p>
      </div>
    );
  }
  return <>{children}</>;
}
