import { useQueries } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { AlarmView } from '@shared/schemas/alarms';

/** The alarms an NCR is raised from (GET /api/v1/alarms/:id each), to show what they are and prefill the form. */
export function useSourceAlarms(ids: number[]) {
  return useQueries({
    queries: ids.map((id) => ({
      queryKey: ['alarms', 'detail', id] as const,
      queryFn: ({ signal }: { signal: AbortSignal }) => http<AlarmView>(`/api/v1/alarms/${id}`, { signal }),
    })),
  });
}
