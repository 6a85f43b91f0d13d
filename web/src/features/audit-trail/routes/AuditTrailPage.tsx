import { useSearchParams } from 'react-router-dom';
import { usePlantClock } from '@web/lib/catalogue';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { auditCsvHref, auditQueryFields, useAuditEvents, useAuditFacets, type AuditQuery } from '../api/audit-events';
import { AuditFilters } from '../components/AuditFilters';
import { EventList } from '../components/EventList';
import { ChainCheck } from '../components/ChainCheck';

/** The filter lives in the address, so a filtered trail can be bookmarked and the export takes the same one. */
function queryOf(search: URLSearchParams): AuditQuery {
  const query: AuditQuery = {};
  for (const k of auditQueryFields) {
    const v = search.get(k);
    if (v) query[k] = v;
  }
  return query;
}

/** /audit-trail: every recorded change, who made it and when, for the auditor; with its export and the chain check. */
export default function AuditTrailPage() {
  const [search, setSearch] = useSearchParams();
  const query = queryOf(search);
  const clock = usePlantClock().data;
  const facets = useAuditFacets();
  const events = useAuditEvents(query);
  const items = events.data?.pages.flatMap((p) => p.items) ?? [];
  const filterKey = JSON.stringify(query);

  return (
    <>
      <PageHeader
        title="Audit trail"
        description="Every change recorded in Prismline — who made it, when, what it was before and after, and why — newest first. Nothing in the trail can be changed or removed."
        actions={
          <a
            href={auditCsvHref(query)}
            download
            className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 font-medium text-zinc-800 hover:bg-zinc-100 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-accent-600"
          >
            Export CSV{Object.keys(query).length ? ' (this filter)' : ''}
          </a>
        }
      />
      <div className="space-y-6">
        <ChainCheck />
        {/* Keyed by the filter so its fields start from the address again after Back or a bookmark. */}
        {clock ? (
          <AuditFilters key={filterKey} query={query} facets={facets.data} clock={clock} onApply={(q) => setSearch(new URLSearchParams(q as Record<string, string>))} />
        ) : (
          <Loading label="Loading the plant's calendar…" />
        )}
        <section aria-labelledby="audit-events-heading" className="space-y-3">
          <h2 id="audit-events-heading" className="text-lg font-semibold text-zinc-900">
            Events
          </h2>
          {events.isPending ? (
            <Loading label="Loading the events…" />
          ) : events.isError ? (
            <ErrorState title="Could not load the events" error={events.error} onRetry={() => void events.refetch()} />
          ) : items.length === 0 ? (
            <EmptyState title="No events match this filter">Widen the period or clear the filter.</EmptyState>
          ) : (
            <>
              <EventList events={items} />
              <div className="flex flex-wrap items-center gap-3">
                <span className="figures text-sm text-zinc-700">
                  {items.length.toLocaleString('en-GB')} event{items.length === 1 ? '' : 's'} shown{events.hasNextPage ? ', more are older' : ', the oldest reached'}
                </span>
                {events.hasNextPage && (
                  <Button variant="secondary" size="sm" busy={events.isFetchingNextPage} onClick={() => void events.fetchNextPage()}>
                    Load more
                  </Button>
                )}
              </div>
            </>
          )}
        </section>
      </div>
    </>
  );
}
