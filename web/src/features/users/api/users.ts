import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { sessionQueryKey, type SessionUser } from '@web/lib/session';
import type { CreateUserInput, PublicUser, UpdateUserInput } from '@shared/schemas/users';

/** Query keys of this feature; mutations invalidate `userKeys.all` so every list refreshes. */
export const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
};

export async function fetchUsers(signal?: AbortSignal): Promise<PublicUser[]> {
  const { items } = await http<{ items: PublicUser[] }>('/api/v1/users', { signal });
  return items;
}

export function createUser(input: CreateUserInput) {
  return http<PublicUser>('/api/v1/users', { method: 'POST', body: input });
}

export function updateUser(id: number, changes: UpdateUserInput) {
  return http<PublicUser>(`/api/v1/users/${id}`, { method: 'PATCH', body: changes });
}

export const usersQueryOptions = () =>
  queryOptions({
    queryKey: userKeys.list(),
    queryFn: ({ signal }) => fetchUsers(signal),
  });

export function useUsers() {
  return useQuery(usersQueryOptions());
}

export function useCreateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createUser,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: userKeys.all }),
  });
}

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, changes }: { id: number; changes: UpdateUserInput }) => updateUser(id, changes),
    onSuccess: async (_user, { id }) => {
      await queryClient.invalidateQueries({ queryKey: userKeys.all });
      // The header shows the session's name and role, so a change to one's own account must reach it.
      if (queryClient.getQueryData<SessionUser | null>(sessionQueryKey)?.id === id) {
        await queryClient.invalidateQueries({ queryKey: sessionQueryKey });
      }
    },
  });
}
