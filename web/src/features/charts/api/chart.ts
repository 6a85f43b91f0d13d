import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { chartKeys, overviewKeys, type ChartRange } from '@web/lib/query-keys';

export type { ChartRange };
import type { CharacteristicChart, ExcludePointInput, IncludePointInput, LimitRevisionRecord } from '@shared/schemas/charts';

export function fetchChart(id: number, range: ChartRange, signal?: AbortSignal): Promise<CharacteristicChart> {
  const params = new URLSearchParams();
  if (range.from) params.set('from', range.from);
  if (range.to) params.set('to', range.to);
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

export const chartQueryOptions = (id: number, range: ChartRange = {}) =>
  queryOptions({
    queryKey: chartKeys.chart(id, range),
    queryFn: ({ signal }) => fetchChart(id, range, signal),
  });

export const limitRevisionsQueryOptions = (id: number) =>
  queryOptions({
    queryKey: chartKeys.revisions(id),
    queryFn: ({ signal }) => fetchLimitRevisions(id, signal),
  });

/** A changed period keeps the previous chart on screen until the new one arrives. */
export function useChart(id: number, range: ChartRange) {
  return useQuery({ ...chartQueryOptions(id, range), placeholderData: keepPreviousData });
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
