import { infiniteQueryOptions, queryOptions, useInfiniteQuery, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { AuditChainVerdict, AuditEventPage, AuditFacets } from '@shared/schemas/audit-events';

/** The filter as the API reads it: blank fields are left out; from and to are plant days (YYYY-MM-DD). */
export interface AuditQuery {
  entity?: string;
  entityId?: string;
  /** A user id, or "system". */
  actor?: string;
  action?: string;
  from?: string;
  to?: string;
  q?: string;
}

export const auditQueryFields = ['entity', 'entityId', 'actor', 'action', 'from', 'to', 'q'] as const satisfies readonly (keyof AuditQuery)[];

const PAGE_SIZE = 50;

export const auditKeys = {
  all: ['audit-events'] as const,
  list: (query: AuditQuery) => [...auditKeys.all, 'list', query] as const,
  facets: () => [...auditKeys.all, 'facets'] as const,
  verify: () => [...auditKeys.all, 'verify'] as const,
};

function searchOf(query: AuditQuery): URLSearchParams {
  const search = new URLSearchParams();
  for (const k of auditQueryFields) if (query[k]) search.set(k, query[k]);
  return search;
}

export const auditEventsQueryOptions = (query: AuditQuery) =>
  infiniteQueryOptions({
    queryKey: auditKeys.list(query),
    queryFn: ({ pageParam, signal }) => {
      const search = searchOf(query);
      search.set('limit', String(PAGE_SIZE));
      if (pageParam !== null) search.set('after', String(pageParam));
      return http<AuditEventPage>(`/api/v1/audit-events?${search}`, { signal });
    },
    initialPageParam: null as number | null,
    getNextPageParam: (last) => last.nextCursor,
  });

/** The trail, newest first, a page of 50 at a time ("Load more" fetches the next). */
export const useAuditEvents = (query: AuditQuery) => useInfiniteQuery(auditEventsQueryOptions(query));

export const auditFacetsQueryOptions = () =>
  queryOptions({ queryKey: auditKeys.facets(), queryFn: ({ signal }) => http<AuditFacets>('/api/v1/audit-events/facets', { signal }), staleTime: 60_000 });

/** What the trail holds, for the pick lists. */
export const useAuditFacets = () => useQuery(auditFacetsQueryOptions());

/**
 * The chain check. It reads every event, which takes seconds on a large trail, so it runs when the
 * auditor asks (refetch), never on its own.
 */
export const useChainCheck = () =>
  useQuery({ queryKey: auditKeys.verify(), queryFn: ({ signal }) => http<AuditChainVerdict>('/api/v1/audit-events/verify', { signal }), enabled: false, retry: false });

/** The export of the same filter: every event it picks, oldest first. */
export const auditCsvHref = (query: AuditQuery) => {
  const search = searchOf(query).toString();
  return `/api/v1/audit-events.csv${search ? `?${search}` : ''}`;
};
