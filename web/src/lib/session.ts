import { queryOptions, useMutation, useQuery, useQueryClient, type QueryClient } from '@tanstack/react-query';
import { ApiError, http } from './http';
import type { LoginInput, PublicUser } from '@shared/schemas/users';

/** The signed-in user as /auth/me and /auth/login return it. */
export type SessionUser = Pick<PublicUser, 'id' | 'email' | 'name' | 'role'>;

export const sessionQueryKey = ['session'] as const;

/** The current user, or null when nobody is signed in (the API answers 401). */
export async function fetchSession(signal?: AbortSignal): Promise<SessionUser | null> {
  try {
    return await http<SessionUser>('/api/v1/auth/me', { signal, endsSessionOn401: false });
  } catch (error) {
    if (error instanceof ApiError && error.status === 401) return null;
    throw error;
  }
}

export const sessionQueryOptions = () =>
  queryOptions({
    queryKey: sessionQueryKey,
    queryFn: ({ signal }) => fetchSession(signal),
    // The session changes only through sign-in, sign-out or a 401, which all write the cache directly.
    staleTime: Infinity,
    retry: false,
  });

export function useSession() {
  return useQuery(sessionQueryOptions());
}

/** For components inside RequireAuth, where a user is always present. */
export function useSignedInUser(): SessionUser {
  const { data } = useSession();
  if (!data) throw new Error('useSignedInUser() used outside RequireAuth');
  return data;
}

export function signIn(input: LoginInput) {
  return http<{ token: string; user: SessionUser }>('/api/v1/auth/login', {
    method: 'POST',
    body: input,
    endsSessionOn401: false,
  });
}

export function signOut() {
  return http<void>('/api/v1/auth/logout', { method: 'POST', endsSessionOn401: false });
}

/**
 * Records who is signed in now (null: nobody) and drops everything cached for the previous
 * session, so no data of one user shows through to the next.
 */
export function replaceSession(queryClient: QueryClient, user: SessionUser | null) {
  queryClient.removeQueries({ predicate: (query) => query.queryKey[0] !== sessionQueryKey[0] });
  queryClient.setQueryData(sessionQueryKey, user);
}

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signIn,
    onSuccess: ({ user }) => replaceSession(queryClient, user),
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: signOut,
    // Signed out in this page even when the server could not be reached to clear the cookie.
    onSettled: () => replaceSession(queryClient, null),
  });
}
