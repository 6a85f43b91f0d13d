import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';

export type AlarmStatus = 'open' | 'acknowledged' | 'closed';

export interface Alarm {
  id: number;
  characteristic: { id: number; code: string; name: string; unit: string; decimals: number; productCode: string; lineCode: string | null };
  lot: { id: number; lotNumber: string; producedAt: string };
  rule: string;
  signal: string;
  ruleDescription: string | null;
  chart: 'location' | 'dispersion';
  pointIndex: number;
  statistic: number;
  values: number[];
  limitName: string | null;
  limitValue: number | null;
  description: string;
  late: boolean;
  lateReason: string | null;
  source: string;
  status: AlarmStatus;
  resolution: string | null;
  createdAt: string;
  acknowledgedAt: string | null;
  acknowledgedBy: string | null;
  acknowledgeNote: string | null;
  closedAt: string | null;
  closedBy: string | null;
  closeNote: string | null;
}

export interface AlarmList {
  items: Alarm[];
  counts: Partial<Record<AlarmStatus, number>>;
}

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
  http<Alarm>(`/api/v1/alarms/${id}/${action}`, { method: 'POST', body: { note } });

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
