import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { StrictMode } from 'react';
import { createBrowserRouter, RouterProvider, type RouteObject } from 'react-router';
import { isApiError, setUnauthenticatedHandler } from '../lib/api';
import { endSession } from '../lib/session';

type Router = ReturnType<typeof createBrowserRouter>;

export function createQueryClient() {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 30_000,
        // A 4xx will not change by asking again; a network blip or 5xx might.
        retry: (failures, error) => !(isApiError(error) && error.status >= 400 && error.status < 500) && failures < 2,
      },
      mutations: { retry: false },
    },
  });
}

/** The pieces of a running client; tests build the same with a memory router. */
export function createClient(routes: RouteObject[], makeRouter: (routes: RouteObject[]) => Router = (r) => createBrowserRouter(r)) {
  const queryClient = createQueryClient();
  const router = makeRouter(routes);
  // A 401 on any call means the session ended: forget the user, and the route guard sends
  // them to sign-in with the way back (no full page reload).
  setUnauthenticatedHandler(() => endSession(queryClient));
  return { queryClient, router };
}

export function App({ queryClient, router }: { queryClient: QueryClient; router: Router }) {
  return (
    <StrictMode>
      <QueryClientProvider client={queryClient}>
        <RouterProvider router={router} />
      </QueryClientProvider>
    </StrictMode>
  );
}
