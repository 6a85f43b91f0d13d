import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { RunDetail, RunSummary } from '@shared/schemas/runs';

export type { RunStatus, RunSummary } from '@shared/schemas/runs';

export const runKeys = {
  all: ['spc-runs'] as const,
  list: () => [...runKeys.all, 'list'] as const,
  detail: (id: number) => [...runKeys.all, 'detail', id] as const,
};

export const isActive = (r: Pick<RunSummary, 'status'>) => r.status === 'queued' || r.status === 'running';

/** While a run is under way the list is asked again every 1.5 s; otherwise every half minute. */
export const LIVE_MS = 1500;
const IDLE_MS = 30_000;

export async function fetchRuns(signal?: AbortSignal): Promise<RunSummary[]> {
  const { items } = await http<{ items: RunSummary[] }>('/api/v1/spc-runs?limit=50', { signal });
  return items;
}

export const fetchRun = (id: number, signal?: AbortSignal) => http<RunDetail>(`/api/v1/spc-runs/${id}`, { signal });

export const startRun = (characteristicIds?: number[]) =>
  http<{ id: number }>('/api/v1/spc-runs', { method: 'POST', body: characteristicIds ? { characteristicIds } : {} });

export const runsQueryOptions = () =>
  queryOptions({
    queryKey: runKeys.list(),
    queryFn: ({ signal }) => fetchRuns(signal),
    refetchInterval: (query) => (query.state.data?.some(isActive) ? LIVE_MS : IDLE_MS),
  });

export const runQueryOptions = (id: number) =>
  queryOptions({
    queryKey: runKeys.detail(id),
    queryFn: ({ signal }) => fetchRun(id, signal),
    refetchInterval: (query) => (query.state.data && !isActive(query.state.data) ? false : LIVE_MS),
  });

export const useRuns = () => useQuery(runsQueryOptions());
export const useRun = (id: number, enabled = true) => useQuery({ ...runQueryOptions(id), enabled });

export function useStartRun() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: startRun,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: runKeys.all }),
  });
}
