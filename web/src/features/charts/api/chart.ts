import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { chartKeys, overviewKeys } from '@web/lib/query-keys';
import type { CharacteristicChart, ChartPeriod, ExcludePointInput, IncludePointInput, LimitRevisionRecord } from '@shared/schemas/charts';

/** What the chart page asks for: a period, or a lot to open the chart at (the server picks the period). */
export interface ChartQuery {
  period?: ChartPeriod;
  lot?: string;
}

export function fetchChart(id: number, request: ChartQuery, signal?: AbortSignal): Promise<CharacteristicChart> {
  const params = new URLSearchParams();
  if (request.period) params.set('period', request.period);
  if (request.lot) params.set('lot', request.lot);
  const query = params.size ? `?${params}` : '';
  return http<CharacteristicChart>(`/api/v1/characteristics/${id}/chart${query}`, { signal });
}

export async function fetchLimitRevisions(id: number, signal?: AbortSignal): Promise<LimitRevisionRecord[]> {
  const { items } = await http<{ items: LimitRevisionRecord[] }>(`/api/v1/characteristics/${id}/limit-revisions`, { signal });
  return items;
}

export function excludePoint(id: number, input: ExcludePointInput) {
  return http<{ id: number }>(`/api/v1/characteristics/${id}/exclusions`, { method: 'POST', body: input });
}

export function includePoint(id: number, lotId: number, input: IncludePointInput) {
  return http<{ id: number }>(`/api/v1/characteristics/${id}/exclusions/${lotId}`, { method: 'DELETE', body: input });
}

export interface FreezeLimitsBody {
  baselineFrom: string;
  baselineTo: string;
  reason: string;
}

export function freezeLimits(id: number, input: FreezeLimitsBody) {
  return http<LimitRevisionRecord>(`/api/v1/characteristics/${id}/limit-revisions`, { method: 'POST', body: input });
}

export const chartQueryOptions = (id: number, request: ChartQuery = {}) =>
  queryOptions({
    queryKey: [...chartKeys.characteristic(id), 'chart', request] as const,
    queryFn: ({ signal }) => fetchChart(id, request, signal),
  });

export const limitRevisionsQueryOptions = (id: number) =>
  queryOptions({
    queryKey: chartKeys.revisions(id),
    queryFn: ({ signal }) => fetchLimitRevisions(id, signal),
  });

/** A changed period keeps the previous chart on screen until the new one arrives. */
export function useChart(id: number, request: ChartQuery) {
  return useQuery({ ...chartQueryOptions(id, request), placeholderData: keepPreviousData });
}

export function useLimitRevisions(id: number) {
  return useQuery(limitRevisionsQueryOptions(id));
}

function useChartChanged(id: number) {
  const queryClient = useQueryClient();
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: chartKeys.characteristic(id) }),
      queryClient.invalidateQueries({ queryKey: overviewKeys.all }),
    ]);
}

export function useExcludePoint(id: number) {
  const changed = useChartChanged(id);
  return useMutation({ mutationFn: (input: ExcludePointInput) => excludePoint(id, input), onSuccess: changed });
}

export function useIncludePoint(id: number) {
  const changed = useChartChanged(id);
  return useMutation({ mutationFn: ({ lotId, reason }: { lotId: number; reason: string }) => includePoint(id, lotId, { reason }), onSuccess: changed });
}

export function useFreezeLimits(id: number) {
  const changed = useChartChanged(id);
  return useMutation({ mutationFn: (input: FreezeLimitsBody) => freezeLimits(id, input), onSuccess: changed });
}
