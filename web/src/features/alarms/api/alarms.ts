import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { AlarmDetail, AlarmGroupView, AlarmList, AlarmOutcome, AlarmStatus, BulkAcknowledgeResult, CauseCategory } from '@shared/schemas/alarms';

export const alarmKeys = {
  all: ['alarms'] as const,
  list: (filter: AlarmFilter) => [...alarmKeys.all, 'list', filter] as const,
  detail: (id: number) => [...alarmKeys.all, 'detail', id] as const,
};

/** The inbox's filter, as the page keeps it in the address (search params) and the API reads it. */
export interface AlarmFilter {
  status?: AlarmStatus;
  lineId?: string;
  productId?: string;
  characteristicId?: string;
  rule?: string;
  /** A user's id, `me` or `nobody`. */
  assignee?: string;
  olderThanDays?: string;
  newerThanDays?: string;
  sort?: 'priority' | 'newest' | 'oldest';
  /** Part of a lot number or characteristic code. */
  q?: string;
  limit: number;
}

const query = (f: AlarmFilter) =>
  new URLSearchParams(Object.entries(f).flatMap(([k, v]) => (v === undefined || v === '' ? [] : [[k, String(v)]])));

export const fetchAlarms = (filter: AlarmFilter, signal?: AbortSignal) => http<AlarmList>(`/api/v1/alarms?${query(filter)}`, { signal });

export const alarmsQueryOptions = (filter: AlarmFilter) =>
  queryOptions({
    queryKey: alarmKeys.list(filter),
    queryFn: ({ signal }) => fetchAlarms(filter, signal),
    refetchInterval: 60_000,
    placeholderData: (previous) => previous,
  });

export const useAlarms = (filter: AlarmFilter) => useQuery(alarmsQueryOptions(filter));

export const alarmQueryOptions = (id: number) =>
  queryOptions({ queryKey: alarmKeys.detail(id), queryFn: ({ signal }) => http<AlarmDetail>(`/api/v1/alarms/${id}`, { signal }) });

export const useAlarm = (id: number) => useQuery(alarmQueryOptions(id));

/** PATCH /api/v1/alarms/:id: a step, its outcome, the assignee or the investigation. */
export interface AlarmPatch {
  status?: AlarmStatus;
  outcome?: AlarmOutcome;
  causeCategory?: CauseCategory;
  note?: string;
  excludePoints?: boolean;
  assigneeId?: number | null;
  groupId?: number | null;
}

function useAlarmMutation<V, R>(fn: (v: V) => Promise<R>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: alarmKeys.all }) });
}

export const usePatchAlarm = (id: number) => useAlarmMutation((body: AlarmPatch) => http<AlarmDetail>(`/api/v1/alarms/${id}`, { method: 'PATCH', body }));

export const useCommentOnAlarm = (id: number) => useAlarmMutation((body: string) => http<AlarmDetail>(`/api/v1/alarms/${id}/comments`, { method: 'POST', body: { body } }));

export const useAcknowledgeAlarms = () =>
  useAlarmMutation((v: { ids: number[]; note?: string }) => http<BulkAcknowledgeResult>('/api/v1/alarms/acknowledge', { method: 'POST', body: v }));

export const useCreateAlarmGroup = () =>
  useAlarmMutation((v: { title: string; note?: string; alarmIds: number[] }) => http<AlarmGroupView>('/api/v1/alarm-groups', { method: 'POST', body: v }));
