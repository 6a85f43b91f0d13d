import { useState, type ReactNode } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { ncrSeverities, ncrStatuses, ncrStatusWords } from '@shared/schemas/ncrs';
import { useNcrs } from '../api/ncrs';
import { ncrListSearchParams, readNcrListSearch, type NcrListSearch } from '../lib/list-filter';
import { severityWords } from '../lib/words';
import { NcrStatusBadge, SeverityBadge } from '../components/Badges';
import { useMay } from '@web/app/permissions';
import { useProducts } from '@web/lib/catalogue';
import { usePeople } from '@web/lib/people';
import { PlantTime } from '@web/components/PlantTime';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Input, Select } from '@web/components/ui/Field';
import { PlainTable } from '@web/components/ui/Table';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { cx } from '@web/components/ui/cx';

const PAGE = 100;

/** /ncrs: every NCR of the filter, newest first, with how many are in each state. */
export default function NcrListPage() {
  const [params, setParams] = useSearchParams();
  const search = readNcrListSearch(params);
  const [limit, setLimit] = useState(PAGE);
  const [typed, setTyped] = useState(search.q);
  const ncrs = useNcrs({ ...search, limit });
  const products = useProducts();
  const people = usePeople();
  const mayRaise = useMay('ncr.raise');

  const change = (next: Partial<NcrListSearch>) => {
    setParams(ncrListSearchParams({ ...search, ...next }));
    setLimit(PAGE);
  };
  const filtered = params.size > 0;

  return (
    <>
      <PageHeader
        title="Nonconformance reports"
        description="Each NCR follows a nonconformance from containment through root cause and actions to the decision on every lot concerned."
        actions={
          mayRaise && (
            <Link to="/ncrs/new" className="inline-flex h-10 items-center rounded-md bg-accent-700 px-4 font-medium text-white hover:bg-accent-800">
              Raise NCR
            </Link>
          )
        }
      />
      <div className="space-y-4">
        <nav aria-label="NCRs by state" className="flex flex-wrap gap-1 border-b border-zinc-200">
          {([undefined, ...ncrStatuses] as const).map((status) => {
            const count = status ? ncrs.data?.counts[status] ?? 0 : undefined;
            const current = search.status === status;
            return (
              <button
                key={status ?? 'all'}
                type="button"
                aria-pressed={current}
                onClick={() => change({ status })}
                className={cx('-mb-px border-b-2 px-4 py-2 font-medium', current ? 'border-accent-700 text-accent-800' : 'border-transparent text-zinc-600 hover:text-zinc-900')}
              >
                {status ? ncrStatusWords[status] : 'All states'}
                {count !== undefined && ncrs.data && <span className="figures ml-1.5 text-sm" data-testid={`count-${status}`}>({count})</span>}
              </button>
            );
          })}
        </nav>
        <form
          role="search"
          aria-label="Filter the NCRs"
          className="flex flex-wrap items-end gap-3"
          onSubmit={(e) => {
            e.preventDefault();
            change({ q: typed.trim() });
          }}
        >
          <FilterSelect label="Severity" value={search.severity ?? ''} onChange={(v) => change({ severity: (v || undefined) as NcrListSearch['severity'] })}>
            <option value="">Any severity</option>
            {ncrSeverities.map((s) => (
              <option key={s} value={s}>
                {severityWords[s]}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Product" value={search.productId ? String(search.productId) : ''} onChange={(v) => change({ productId: v ? Number(v) : undefined })}>
            <option value="">Any product</option>
            {(products.data ?? []).map((p) => (
              <option key={p.id} value={p.id}>
                {p.code} · {p.name}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Assignee" value={search.assigneeId ? String(search.assigneeId) : ''} onChange={(v) => change({ assigneeId: v ? Number(v) : undefined })}>
            <option value="">Anyone</option>
            {(people.data ?? []).map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </FilterSelect>
          <label className="flex h-10 items-center gap-2 text-sm font-medium text-zinc-800">
            <input type="checkbox" className="size-4" checked={search.overdue} onChange={(e) => change({ overdue: e.target.checked })} />
            With overdue actions only
          </label>
          <div className="space-y-1">
            <label htmlFor="ncr-search" className="block text-sm font-medium text-zinc-800">
              Number, title or lot
            </label>
            <div className="flex gap-2">
              <Input id="ncr-search" type="search" className="w-56" maxLength={100} placeholder="e.g. NCR-2026 or L1-26" value={typed} onChange={(e) => setTyped(e.target.value)} />
              <Button type="submit" variant="secondary">
                Find
              </Button>
            </div>
          </div>
          {filtered && (
            <Button
              variant="quiet"
              onClick={() => {
                setTyped('');
                setParams(new URLSearchParams());
              }}
            >
              Clear the filter
            </Button>
          )}
        </form>
        {ncrs.isPending ? (
          <Loading label="Loading NCRs…" />
        ) : ncrs.isError ? (
          <ErrorState title="Could not load the NCRs" error={ncrs.error} onRetry={() => ncrs.refetch()} />
        ) : ncrs.data.items.length === 0 ? (
          <EmptyState title={filtered ? 'No NCR matches this filter.' : 'No NCR has been raised yet.'} />
        ) : (
          <>
            <p className="figures text-sm text-zinc-600" aria-live="polite">
              {ncrs.data.items.length === ncrs.data.total ? `${ncrs.data.total} NCRs` : `${ncrs.data.items.length} of ${ncrs.data.total} NCRs, newest first`}
            </p>
            <PlainTable caption="Nonconformance reports" headings={['Number', 'Title', 'Product', 'Severity', 'State', 'Assignee', 'Lots', 'Open actions', 'Raised']}>
              {ncrs.data.items.map((n) => (
                <tr key={n.id} className="border-b border-zinc-100 align-top last:border-b-0 hover:bg-zinc-50" data-ncr={n.number}>
                  <td className="px-3 py-2 font-mono whitespace-nowrap">
                    <Link className="text-accent-800 underline" to={`/ncrs/${n.id}`}>
                      {n.number}
                    </Link>
                  </td>
                  <td className="min-w-56 px-3 py-2">{n.title}</td>
                  <td className="px-3 py-2 font-mono">{n.product?.code ?? '—'}</td>
                  <td className="px-3 py-2">
                    <SeverityBadge severity={n.severity} />
                  </td>
                  <td className="px-3 py-2">
                    <NcrStatusBadge status={n.status} />
                  </td>
                  <td className="px-3 py-2">{n.assignee?.name ?? <span className="text-zinc-500">Nobody yet</span>}</td>
                  <td className="px-3 py-2 font-mono text-sm">{n.lotNumbers.length > 3 ? `${n.lotNumbers.slice(0, 3).join(', ')} +${n.lotNumbers.length - 3}` : n.lotNumbers.join(', ') || '—'}</td>
                  <td className="figures px-3 py-2 whitespace-nowrap">
                    {n.openActions}
                    {n.overdueActions > 0 && <span className="ml-2 font-semibold text-red-800">{n.overdueActions} overdue</span>}
                  </td>
                  <td className="figures px-3 py-2 whitespace-nowrap">
                    <PlantTime at={n.createdAt} kind="date" />
                  </td>
                </tr>
              ))}
            </PlainTable>
            {ncrs.data.items.length < ncrs.data.total && limit < 500 && (
              <Button variant="secondary" size="sm" busy={ncrs.isFetching} onClick={() => setLimit(Math.min(limit + PAGE, 500))}>
                Show {PAGE} more
              </Button>
            )}
          </>
        )}
      </div>
    </>
  );
}

function FilterSelect({ label, value, onChange, children }: { label: string; value: string; onChange: (value: string) => void; children: ReactNode }) {
  const id = `ncr-filter-${label.toLowerCase()}`;
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium text-zinc-800">
        {label}
      </label>
      <Select id={id} value={value} onChange={(e) => onChange(e.target.value)} className="w-52">
        {children}
      </Select>
    </div>
  );
}
