import { queryOptions, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { ncrKeys } from '@web/lib/ncr-keys';
import type { NcrActionDue } from '@shared/schemas/ncrs';

/** GET /api/v1/ncrs/overdue-actions: open NCR actions past their due date or due within two days. */
export const ncrActionsDueQueryOptions = () =>
  queryOptions({
    queryKey: ncrKeys.actionsDue(),
    queryFn: ({ signal }) => http<NcrActionDue[]>('/api/v1/ncrs/overdue-actions', { signal }),
    refetchInterval: 5 * 60_000,
  });

export const useNcrActionsDue = () => useQuery(ncrActionsDueQueryOptions());
