import { useEffect, useState } from 'react';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router-dom';
import { ApiError, onUnauthorized } from '../lib/http';
import { replaceSession } from '@web/lib/session';
import { router } from './router';

function createQueryClient() {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        // A 4xx will answer the same again; only a lost connection or a server error is worth a retry.
        retry: (failureCount, error) => !(error instanceof ApiError && error.status >= 400 && error.status < 500) && failureCount < 2,
      },
    },
  });
}

export function Providers() {
  const [queryClient] = useState(createQueryClient);

  // A 401 on any request means the session ended (expired, or the user was deactivated):
  // dropping it makes RequireAuth send the user to sign-in and back to the same page afterwards.
  useEffect(() => onUnauthorized(() => replaceSession(queryClient, null)), [queryClient]);

  return (
    <QueryClientProvider client={queryClient}>
      <RouterProvider router={router} />
    </QueryClientProvider>
  );
}
