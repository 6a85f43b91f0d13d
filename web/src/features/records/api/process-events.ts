import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { ProcessEventInput } from '@shared/schemas/plant-records';
import { chartKeys } from '@web/lib/query-keys';

export interface ProcessEvent {
  id: number;
  occurredAt: string;
  title: string;
  description: string | null;
  lineCode: string | null;
  productCode: string | null;
  createdBy: string | null;
}

/** A period as instants with offset; either end may be open. */
export interface EventPeriod {
  from?: string;
  to?: string;
}

/** Query keys of this resource; a new event invalidates `processEventKeys.all`. */
export const processEventKeys = {
  all: ['process-events'] as const,
  list: (period: EventPeriod) => [...processEventKeys.all, 'list', period] as const,
};

export async function fetchProcessEvents(period: EventPeriod, signal?: AbortSignal): Promise<ProcessEvent[]> {
  const params = new URLSearchParams();
  if (period.from) params.set('from', period.from);
  if (period.to) params.set('to', period.to);
  const query = params.size ? `?${params}` : '';
  const { items } = await http<{ items: ProcessEvent[] }>(`/api/v1/process-events${query}`, { signal });
  return items;
}

export function createProcessEvent(input: ProcessEventInput) {
  return http<{ id: number; occurredAt: string; title: string }>('/api/v1/process-events', { method: 'POST', body: input });
}

export const processEventsQueryOptions = (period: EventPeriod = {}) =>
  queryOptions({
    queryKey: processEventKeys.list(period),
    queryFn: ({ signal }) => fetchProcessEvents(period, signal),
  });

export function useProcessEvents(period: EventPeriod) {
  return useQuery(processEventsQueryOptions(period));
}

/** Events are markers on the control charts, so the charts refresh too. */
export function useCreateProcessEvent() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: createProcessEvent,
    onSuccess: () =>
      Promise.all([queryClient.invalidateQueries({ queryKey: processEventKeys.all }), queryClient.invalidateQueries({ queryKey: chartKeys.all })]),
  });
}
