import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { ncrKeys, type NcrListFilter } from '@web/lib/ncr-keys';
import { lotKeys } from '@web/lib/lots';
import type { NcrList, NcrView } from '@shared/schemas/ncrs';
import type { CreateNcrActionInput, CreateNcrInput, NcrTransitionInput, UpdateNcrActionInput, UpdateNcrInput } from '@shared/schemas/ncr-requests';

export { ncrKeys, type NcrListFilter };

const base = '/api/v1/ncrs';

export function fetchNcrs(filter: NcrListFilter, signal?: AbortSignal): Promise<NcrList> {
  const params = new URLSearchParams({ limit: String(filter.limit) });
  if (filter.status) params.set('status', filter.status);
  if (filter.severity) params.set('severity', filter.severity);
  if (filter.productId) params.set('productId', String(filter.productId));
  if (filter.assigneeId) params.set('assigneeId', String(filter.assigneeId));
  if (filter.overdue) params.set('overdue', 'true');
  if (filter.q) params.set('q', filter.q);
  return http<NcrList>(`${base}?${params}`, { signal });
}

export const fetchNcr = (id: number, signal?: AbortSignal) => http<NcrView>(`${base}/${id}`, { signal });

export const raiseNcr = (input: CreateNcrInput) => http<NcrView>(base, { method: 'POST', body: input });
export const updateNcr = (id: number, changes: UpdateNcrInput) => http<NcrView>(`${base}/${id}`, { method: 'PATCH', body: changes });
export const moveNcr = (id: number, step: NcrTransitionInput) => http<NcrView>(`${base}/${id}/transitions`, { method: 'POST', body: step });
export const addNcrAction = (id: number, action: CreateNcrActionInput) => http<NcrView>(`${base}/${id}/actions`, { method: 'POST', body: action });
export const updateNcrAction = (id: number, actionId: number, changes: UpdateNcrActionInput) =>
  http<NcrView>(`${base}/${id}/actions/${actionId}`, { method: 'PATCH', body: changes });

/** Multipart: the file and an optional note; the server refuses too big (413) and types it does not keep (415). */
export function attachToNcr(id: number, file: File, note?: string) {
  const body = new FormData();
  body.set('file', file);
  if (note) body.set('note', note);
  return http<NcrView>(`${base}/${id}/attachments`, { method: 'POST', body });
}

export const ncrsQueryOptions = (filter: NcrListFilter) =>
  queryOptions({
    queryKey: ncrKeys.list(filter),
    queryFn: ({ signal }) => fetchNcrs(filter, signal),
    placeholderData: (previous) => previous,
  });

export const ncrQueryOptions = (id: number) =>
  queryOptions({
    queryKey: ncrKeys.detail(id),
    queryFn: ({ signal }) => fetchNcr(id, signal),
  });

export const useNcrs = (filter: NcrListFilter) => useQuery(ncrsQueryOptions(filter));
export const useNcr = (id: number) => useQuery(ncrQueryOptions(id));

export function useRaiseNcr() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: raiseNcr,
    onSuccess: (ncr) => {
      queryClient.setQueryData(ncrKeys.detail(ncr.id), ncr);
      // Containment puts lots on hold: their pages change too.
      return Promise.all([queryClient.invalidateQueries({ queryKey: ncrKeys.all }), queryClient.invalidateQueries({ queryKey: lotKeys.all })]);
    },
  });
}

/**
 * Every write to an NCR answers the NCR as it now stands: it replaces the page's copy at once, and the
 * lists, the overview's actions due and the lots (holds, dispositions) load again.
 */
export function useNcrWrite<T>(id: number, write: (input: T) => Promise<NcrView>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: write,
    onSuccess: (ncr) => {
      queryClient.setQueryData(ncrKeys.detail(id), ncr);
      return Promise.all([
        queryClient.invalidateQueries({ queryKey: ncrKeys.all, predicate: (q) => q.queryKey[1] !== 'detail' }),
        queryClient.invalidateQueries({ queryKey: lotKeys.all }),
      ]);
    },
  });
}

export const useUpdateNcr = (id: number) => useNcrWrite(id, (changes: UpdateNcrInput) => updateNcr(id, changes));
export const useMoveNcr = (id: number) => useNcrWrite(id, (step: NcrTransitionInput) => moveNcr(id, step));
export const useAddNcrAction = (id: number) => useNcrWrite(id, (action: CreateNcrActionInput) => addNcrAction(id, action));
export const useUpdateNcrAction = (id: number) =>
  useNcrWrite(id, ({ actionId, changes }: { actionId: number; changes: UpdateNcrActionInput }) => updateNcrAction(id, actionId, changes));
export const useAttachToNcr = (id: number) => useNcrWrite(id, ({ file, note }: { file: File; note?: string }) => attachToNcr(id, file, note));
