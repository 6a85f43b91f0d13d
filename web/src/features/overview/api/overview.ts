import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { Overview } from '@shared/schemas/overview';
import { overviewKeys, type OverviewFilters } from '@web/lib/query-keys';


export function fetchOverview(filters: OverviewFilters, signal?: AbortSignal): Promise<Overview> {
  const params = new URLSearchParams({ days: String(filters.days) });
  if (filters.line) params.set('line', filters.line);
  if (filters.family) params.set('family', filters.family);
  return http<Overview>(`/api/v1/overview?${params}`, { signal });
}

export const overviewQueryOptions = (filters: OverviewFilters) =>
  queryOptions({
    queryKey: overviewKeys.view(filters),
    queryFn: ({ signal }) => fetchOverview(filters, signal),
    // The morning screen stays on the wall: it refreshes itself every few minutes.
    refetchInterval: 5 * 60_000,
  });

/** Keeps the previous answer on screen while a changed filter loads, so the page does not jump. */
export function useOverview(filters: OverviewFilters) {
  return useQuery({ ...overviewQueryOptions(filters), placeholderData: keepPreviousData });
}
