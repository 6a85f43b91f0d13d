import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from './http';
import type { ManualEntry } from '@shared/ingest';
import { chartKeys } from './query-keys';
import { overviewKeys } from './query-keys';

export interface LotResult {
  id: number;
  characteristicCode: string;
  characteristicName: string;
  unit: string;
  replicate: number;
  value: number;
  testedAt: string | null;
  operator: string | null;
  note: string | null;
  source: 'upload' | 'manual';
  uploadId: number | null;
  uploadFile: string | null;
}

export interface Lot {
  id: number;
  lotNumber: string;
  producedAt: string;
  shift: string | null;
  productCode: string;
  productName: string;
  lineCode: string;
  results: LotResult[];
  /** Per characteristic code, the specification revision in force when the lot was produced. */
  specs: Record<string, { revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: string }>;
}

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
