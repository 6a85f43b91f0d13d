import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { AlarmList, AlarmStatus, AlarmView } from '@shared/schemas/alarms';

export const alarmKeys = {
  all: ['alarms'] as const,
  list: (filter: AlarmFilter) => [...alarmKeys.all, 'list', filter] as const,
};

export interface AlarmFilter {
  status: AlarmStatus;
  /** Part of a lot number or characteristic code. */
  q: string;
  limit: number;
}

export const fetchAlarms = ({ status, q, limit }: AlarmFilter, signal?: AbortSignal) =>
  http<AlarmList>(`/api/v1/alarms?${new URLSearchParams({ status, limit: String(limit), ...(q ? { q } : {}) })}`, { signal });

export const changeAlarm = ({ id, action, note }: { id: number; action: 'acknowledge' | 'close'; note: string }) =>
  http<AlarmView>(`/api/v1/alarms/${id}/${action}`, { method: 'POST', body: { note } });

export const alarmsQueryOptions = (filter: AlarmFilter) =>
  queryOptions({
    queryKey: alarmKeys.list(filter),
    queryFn: ({ signal }) => fetchAlarms(filter, signal),
    refetchInterval: 60_000,
    placeholderData: (previous) => previous,
  });

export const useAlarms = (filter: AlarmFilter) => useQuery(alarmsQueryOptions(filter));

export function useChangeAlarm() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: changeAlarm,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: alarmKeys.all }),
  });
}
