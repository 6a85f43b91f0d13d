import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { http } from './http';
import { lotKeys } from './lots';
import type { LotListItem } from '@shared/schemas/lots';

/** Suggestions a search offers at most: enough to pick from, few enough to read. */
export const LOT_SUGGESTIONS = 8;

export async function searchLots(start: string, signal?: AbortSignal): Promise<LotListItem[]> {
  const params = new URLSearchParams({ q: start, limit: String(LOT_SUGGESTIONS) });
  return (await http<{ items: LotListItem[] }>(`/api/v1/lots?${params}`, { signal })).items;
}

/** Lots whose number starts with what was typed (any case), the lot typed in full first; idle for an empty text. */
export function useLotSearch(start: string) {
  const text = start.trim();
  return useQuery({
    queryKey: [...lotKeys.all, 'search', text] as const,
    queryFn: ({ signal }) => searchLots(text, signal),
    enabled: text.length > 0,
    // The list stays while the next letter's answer is on its way, rather than flickering empty.
    placeholderData: keepPreviousData,
    staleTime: 30_000,
  });
}
