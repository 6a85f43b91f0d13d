import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from './http';
import type { ManualEntry } from '@shared/ingest';
import type { LotResultView, LotView } from '@shared/schemas/lots';
import { chartKeys } from './query-keys';
import { overviewKeys } from './query-keys';

/** A stored result of a lot, as the lot page reads it. */
export type LotResult = LotResultView;
/** GET /api/v1/lots/:lotNumber: the lot, its results, standing, holds and NCRs. */
export type Lot = LotView;

export const lotKeys = {
  all: ['lots'] as const,
  detail: (lotNumber: string) => [...lotKeys.all, lotNumber] as const,
};

export const lotQueryOptions = (lotNumber: string) =>
  queryOptions({
    queryKey: lotKeys.detail(lotNumber),
    queryFn: ({ signal }) => http<Lot>(`/api/v1/lots/${encodeURIComponent(lotNumber)}`, { signal }),
  });

export function useLot(lotNumber: string) {
  return useQuery(lotQueryOptions(lotNumber));
}

/** POST /api/v1/measurements: one lot typed in; a 422 names the form's own fields in its details. */
export function saveManualEntry(entry: ManualEntry) {
  return http<{ rowsImported: number; measurementIds: number[] }>('/api/v1/measurements', { method: 'POST', body: entry });
}

export function useSaveManualEntry() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: saveManualEntry,
    onSuccess: (_outcome, entry) => queryClient.invalidateQueries({ queryKey: lotKeys.detail(entry.lot) }),
  });
}

export interface MeasurementCorrection {
  id: number;
  value: number;
  reason: string;
}

/** The stored measurement after PATCH /api/v1/measurements/:id. */
export interface CorrectedMeasurement {
  id: number;
  value: number;
  characteristicId: number;
  lotId: number;
  replicate: number;
}

export function correctMeasurement({ id, value, reason }: MeasurementCorrection) {
  return http<CorrectedMeasurement>(`/api/v1/measurements/${id}`, { method: 'PATCH', body: { value, reason } });
}

/** A corrected value changes the lot, its characteristic's chart and the overview tiles. */
export function useCorrectMeasurement() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: correctMeasurement,
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: lotKeys.all }),
        queryClient.invalidateQueries({ queryKey: chartKeys.all }),
        queryClient.invalidateQueries({ queryKey: overviewKeys.all }),
      ]),
  });
}

/** The lot page, where a lot's results are read and corrected: every screen that names a lot links here. */
export function lotPath(lotNumber: string): string {
  return `/results/lots/${encodeURIComponent(lotNumber)}`;
}
