import { useMemo } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { lotStatuses, lotStatusWords, type LotListItem, type LotStatus } from '@shared/schemas/lots';
import { lotPath } from '@web/lib/lots';
import { useProducts } from '@web/lib/catalogue';
import { LOT_PAGE_SIZE, useLotList } from '../api/lots';
import { LotStatusBadge } from '@web/components/LotStatusBadge';
import { PlantTime } from '@web/components/PlantTime';
import { PageHeader } from '@web/components/ui/PageHeader';
import { DataTable } from '@web/components/ui/Table';
import { Button } from '@web/components/ui/Button';
import { Select } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const column = createColumnHelper<LotListItem>();

const columns = [
  column.accessor('lotNumber', {
    header: 'Lot',
    cell: (info) => (
      <Link to={lotPath(info.getValue())} className="font-mono text-accent-800 underline underline-offset-2">
        {info.getValue()}
      </Link>
    ),
  }),
  column.accessor('productCode', { header: 'Product', cell: (info) => <span className="font-mono">{info.getValue()}</span> }),
  column.accessor('lineCode', { header: 'Line', cell: (info) => <span className="font-mono">{info.getValue()}</span> }),
  column.accessor('producedAt', {
    header: 'Produced',
    cell: (info) => (
      <>
        <PlantTime at={info.getValue()} className="block font-mono text-sm whitespace-nowrap" />
        {info.row.original.shift && <span className="block text-sm text-zinc-600">{info.row.original.shift} shift</span>}
      </>
    ),
  }),
  column.accessor('status', {
    header: 'Status',
    cell: (info) => {
      const lot = info.row.original;
      return (
        <>
          <LotStatusBadge status={lot.status} />
          {lot.status === 'on-hold' && lot.heldSince && (
            <span className="mt-1 block max-w-md text-sm text-zinc-700">
              Since <PlantTime at={lot.heldSince} className="font-mono" />: <span className="[overflow-wrap:anywhere]">{lot.holdReason}</span>
            </span>
          )}
        </>
      );
    },
  }),
];

const isStatus = (s: string | null): s is LotStatus => (lotStatuses as readonly (string | null)[]).includes(s);

/** /results/lots: every lot, newest first, narrowed to a standing (on hold, rejected…) and a product. */
export default function LotListPage() {
  const [params, setParams] = useSearchParams();
  const statusParam = params.get('status');
  const status = isStatus(statusParam) ? statusParam : undefined;
  const product = params.get('product') || undefined;
  const page = Math.max(0, Math.min(2000, Math.floor(Number(params.get('page')) || 0)));
  const lots = useLotList({ status, product, page });
  const products = useProducts();

  const set = (key: string, value: string) =>
    setParams((p) => {
      if (value) p.set(key, value);
      else p.delete(key);
      if (key !== 'page') p.delete('page');
      return p;
    });

  const data = useMemo(() => lots.data?.items ?? [], [lots.data]);
  const table = useReactTable({ data, columns, enableSorting: false, getCoreRowModel: getCoreRowModel() });

  return (
    <>
      <PageHeader
        title="Lots"
        description="Every lot with results, newest first, and whether it may be dispatched: released, on hold or rejected. Open a lot to see its results and holds."
      />
      <form className="mb-4 flex flex-wrap items-end gap-4" aria-label="Lot filters" onSubmit={(e) => e.preventDefault()}>
        <div className="space-y-1">
          <label htmlFor="lot-status" className="block text-sm font-medium text-zinc-800">
            Status
          </label>
          <Select id="lot-status" value={status ?? ''} onChange={(e) => set('status', e.target.value)} className="w-44">
            <option value="">All lots</option>
            {lotStatuses.map((s) => (
              <option key={s} value={s}>
                {lotStatusWords[s]}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="lot-product" className="block text-sm font-medium text-zinc-800">
            Product
          </label>
          <Select id="lot-product" value={product ?? ''} onChange={(e) => set('product', e.target.value)} className="w-64">
            <option value="">All products</option>
            {(products.data ?? []).map((p) => (
              <option key={p.id} value={p.code}>
                {p.code} · {p.name}
              </option>
            ))}
          </Select>
        </div>
        {lots.isFetching && lots.data && (
          <p className="pb-2 text-sm text-zinc-600" role="status">
            Updating…
          </p>
        )}
      </form>
      {lots.isPending ? (
        <Loading label="Loading lots…" />
      ) : lots.isError ? (
        <ErrorState title="Could not load the lots" error={lots.error} onRetry={() => lots.refetch()} />
      ) : (
        <>
          <DataTable
            table={table}
            caption={status ? `Lots ${lotStatusWords[status].toLowerCase()}, newest first` : 'Lots, newest first'}
            empty={<EmptyState title={status || product ? 'No lot matches these filters' : 'No lot is recorded yet'} />}
          />
          {(page > 0 || lots.data.more) && (
            <nav aria-label="Pages of lots" className="mt-4 flex items-center gap-3">
              <Button variant="secondary" size="sm" disabled={page === 0} onClick={() => set('page', page > 1 ? String(page - 1) : '')}>
                Newer lots
              </Button>
              <span className="text-sm text-zinc-600">
                Lots <span className="font-mono">{page * LOT_PAGE_SIZE + 1}</span>–<span className="font-mono">{page * LOT_PAGE_SIZE + data.length}</span>
              </span>
              <Button variant="secondary" size="sm" disabled={!lots.data.more} onClick={() => set('page', String(page + 1))}>
                Older lots
              </Button>
            </nav>
          )}
        </>
      )}
    </>
  );
}
