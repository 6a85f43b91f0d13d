import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { lotKeys, type Lot } from '@web/lib/lots';
import { overviewKeys } from '@web/lib/query-keys';
import type { LotList, LotStatus } from '@shared/schemas/lots';

/** Lots on one page of the lot list. */
export const LOT_PAGE_SIZE = 50;

export interface LotListFilters {
  status?: LotStatus;
  product?: string;
  /** Zero-based page. */
  page: number;
}

export const lotListKey = (filters: LotListFilters) => [...lotKeys.all, 'list', filters] as const;

export function fetchLotList(filters: LotListFilters, signal?: AbortSignal): Promise<LotList> {
  const params = new URLSearchParams({ limit: String(LOT_PAGE_SIZE), offset: String(filters.page * LOT_PAGE_SIZE) });
  if (filters.status) params.set('status', filters.status);
  if (filters.product) params.set('product', filters.product);
  return http<LotList>(`/api/v1/lots?${params}`, { signal });
}

export const lotListQueryOptions = (filters: LotListFilters) =>
  queryOptions({ queryKey: lotListKey(filters), queryFn: ({ signal }) => fetchLotList(filters, signal) });

/** The lot list; the previous page stays on screen while the next loads. */
export function useLotList(filters: LotListFilters) {
  return useQuery({ ...lotListQueryOptions(filters), placeholderData: keepPreviousData });
}

export interface LotDecision {
  lotNumber: string;
  action: 'hold' | 'release';
  reason: string;
}

/** POST /api/v1/lots/:lotNumber/hold or /release: answers the lot as it now stands. */
export function decideLot({ lotNumber, action, reason }: LotDecision): Promise<Lot> {
  return http<Lot>(`/api/v1/lots/${encodeURIComponent(lotNumber)}/${action}`, { method: 'POST', body: { reason } });
}

/** A hold or release changes the lot page, the lot list and the overview's lots on hold. */
export function useLotDecision() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: decideLot,
    onSuccess: (lot) => {
      queryClient.setQueryData(lotKeys.detail(lot.lotNumber), lot);
      return Promise.all([queryClient.invalidateQueries({ queryKey: lotKeys.all }), queryClient.invalidateQueries({ queryKey: overviewKeys.all })]);
    },
  });
}
