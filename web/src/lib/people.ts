import { queryOptions, useQuery } from '@tanstack/react-query';
import type { Person } from '@shared/schemas/users';
import { http } from './http';

/** The active users an alarm, an NCR or an action may be assigned to (GET /api/v1/people). */
export const peopleQueryOptions = () =>
  queryOptions({
    queryKey: ['people'] as const,
    queryFn: async ({ signal }) => (await http<{ items: Person[] }>('/api/v1/people', { signal })).items,
    staleTime: 5 * 60_000,
  });

export function usePeople() {
  return useQuery(peopleQueryOptions());
}
