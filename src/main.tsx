import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { MutationCache, QueryCache, QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router/dom';
import { ApiError } from './api/client';
import { sessionKeys } from './api/session';
import { AuthProvider } from './auth/AuthProvider';
import { router } from './router';
import './index.css';

// A 401 from any resource means the session ended (expired, signed out elsewhere, or the account
// was deactivated): forget the session so the guards send the user to the sign-in page.
function onApiError(error: unknown, queryKey?: readonly unknown[]) {
  if (error instanceof ApiError && error.status === 401 && queryKey?.[0] !== sessionKeys.all[0]) {
    queryClient.setQueryData(sessionKeys.all, null);
  }
}

const queryClient: QueryClient = new QueryClient({
  queryCache: new QueryCache({ onError: (error, query) => onApiError(error, query.queryKey) }),
  mutationCache: new MutationCache({
    onError: (error, _vars, _ctx, mutation) => {
      // A wrong password at sign-in is a 401 too, but not an ended session.
      if (mutation.options.mutationKey?.[0] !== 'sign-in') onApiError(error, ['mutation']);
    },
  }),
  defaultOptions: {
    queries: {
      refetchOnWindowFocus: true,
      retry: (count, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && count < 2,
    },
  },
});

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <AuthProvider>
        <RouterProvider router={router} />
      </AuthProvider>
    </QueryClientProvider>
  </StrictMode>,
);
