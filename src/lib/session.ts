// The signed-in user, as the whole client sees it: one query, read by the route guard,
// the shell and every permission check.

import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { createContext, useContext } from 'react';
import { meResponseSchema, type User } from '../../shared/api/auth';
import { can, type Permission } from '../../shared/roles';
import { api, isApiError } from './api';

export const sessionQueryKey = ['session'] as const;

export const sessionQuery = queryOptions({
  queryKey: sessionQueryKey,
  queryFn: async ({ signal }): Promise<User | null> => {
    try {
      const { user } = await api.get('/api/auth/me', { signal, schema: meResponseSchema, redirectOnUnauthenticated: false });
      return user;
    } catch (error) {
      if (isApiError(error) && error.status === 401) return null;
      throw error;
    }
  },
  staleTime: 5 * 60_000,
  retry: false,
});

export function useSession() {
  return useQuery(sessionQuery);
}

/** Provided by the session guard (src/app/guards.tsx) to everything it lets through. */
export const CurrentUserContext = createContext<User | null>(null);

/**
 * The signed-in user, for components under the session guard. Read from the guard rather than
 * from the query, so a session that just ended unmounts the page instead of rendering it empty.
 */
export function useCurrentUser(): User {
  const user = useContext(CurrentUserContext);
  if (!user) throw new Error('useCurrentUser used outside the signed-in part of the app');
  return user;
}

export function useCan(permission: Permission): boolean {
  const { data } = useSession();
  return can(data?.roles, permission);
}

/** After sign-in: drop anything cached for a previous user, then remember the new one. */
export function startSession(queryClient: QueryClient, user: User) {
  queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionQueryKey[0] });
  queryClient.setQueryData(sessionQueryKey, user);
}

/** The server said the session is over (expired, revoked): the route guard then sends the user to sign-in. */
export function endSession(queryClient: QueryClient) {
  queryClient.setQueryData(sessionQueryKey, null);
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/logout', undefined, { redirectOnUnauthenticated: false }),
    // Whatever the server said, the local session is over: forget everything cached for this user.
    onSettled: () => {
      queryClient.clear();
      endSession(queryClient);
    },
  });
}

/** Only same-site paths are accepted as a place to return to after sign-in. */
export function safeNextPath(next: string | null | undefined): string {
  if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return '/';
  if (next.startsWith('/sign-in')) return '/';
  return next;
}
