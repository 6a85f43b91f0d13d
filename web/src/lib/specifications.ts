import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from './http';
import type { SpecRevisionInput } from '@shared/schemas/plant-records';
import { catalogueKeys } from './catalogue';
import { chartKeys } from './query-keys';
import { overviewKeys } from './query-keys';

/** One revision of a characteristic's specification, newest first in the history. */
export interface SpecRevision {
  id: number;
  revision: number;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  effectiveFrom: string;
  reason: string | null;
  createdAt: string;
  createdBy: string | null;
}

/** Query keys of this resource; a new revision invalidates `specificationKeys.all`. */
export const specificationKeys = {
  all: ['specifications'] as const,
  revisions: (characteristicId: number) => [...specificationKeys.all, characteristicId, 'revisions'] as const,
};

export async function fetchSpecRevisions(characteristicId: number, signal?: AbortSignal): Promise<SpecRevision[]> {
  const { items } = await http<{ items: SpecRevision[] }>(`/api/v1/characteristics/${characteristicId}/spec-revisions`, { signal });
  return items;
}

export function createSpecRevision(characteristicId: number, input: SpecRevisionInput) {
  return http<SpecRevision>(`/api/v1/characteristics/${characteristicId}/spec-revisions`, { method: 'POST', body: input });
}

export const specRevisionsQueryOptions = (characteristicId: number) =>
  queryOptions({
    queryKey: specificationKeys.revisions(characteristicId),
    queryFn: ({ signal }) => fetchSpecRevisions(characteristicId, signal),
  });

export function useSpecRevisions(characteristicId: number) {
  return useQuery(specRevisionsQueryOptions(characteristicId));
}

/** The revision in force comes with every characteristic and judges charts and lots, so those refresh too. */
export function useCreateSpecRevision(characteristicId: number) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: SpecRevisionInput) => createSpecRevision(characteristicId, input),
    onSuccess: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: specificationKeys.all }),
        queryClient.invalidateQueries({ queryKey: catalogueKeys.characteristics() }),
        queryClient.invalidateQueries({ queryKey: chartKeys.characteristic(characteristicId) }),
        queryClient.invalidateQueries({ queryKey: overviewKeys.all }),
      ]),
  });
}
