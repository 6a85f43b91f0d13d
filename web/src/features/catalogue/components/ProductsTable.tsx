import { useMemo, useState } from 'react';
import { createColumnHelper, getCoreRowModel, getSortedRowModel, useReactTable, type SortingState } from '@tanstack/react-table';
import type { Notice } from '@web/components/ui/Notice';
import type { ProductView } from '@shared/schemas/catalogue';
import { useUpdateProduct } from '../api/catalogue';
import { actionsColumn, statusColumn, type Consequences } from './RowActions';
import { DataTable } from '@web/components/ui/Table';

const column = createColumnHelper<ProductView>();

const consequences: Consequences = {
  deactivate: (
    <p>
      Uploads and manual entry refuse its lots, and the SPC run and the overview leave its characteristics out. Its lots, results and charts stay,
      and it can be reactivated at any time.
    </p>
  ),
  reactivate: <p>Uploads accept its lots again and the next SPC run charts its active characteristics.</p>,
  deactivated: (code: string) => `${code} is deactivated: uploads refuse its lots and the SPC run leaves it out.`,
};

export function ProductsTable({ products, onEdit, onNotice }: { products: ProductView[]; onEdit: (product: ProductView) => void; onNotice: (notice: Notice) => void }) {
  const { mutateAsync: update } = useUpdateProduct();
  const [sorting, setSorting] = useState<SortingState>([]);
  const columns = useMemo(
    () => [
      column.accessor('code', {
        header: 'Product',
        cell: (info) => (
          <>
            <span className="block font-mono text-sm">{info.getValue()}</span>
            <span className="block text-sm text-zinc-600">{info.row.original.name}</span>
          </>
        ),
      }),
      column.accessor('family', { header: 'Family', cell: (info) => <span className="text-sm">{info.getValue()}</span> }),
      column.accessor((p) => p.declaredClass ?? '', {
        id: 'declaredClass',
        header: 'Declared class',
        cell: (info) => <span className="font-mono text-sm">{info.getValue() || '–'}</span>,
      }),
      column.accessor((p) => p.lineCode ?? '', {
        id: 'line',
        header: 'Line',
        cell: (info) => (
          <span className="text-sm">
            <span className="font-mono">{info.getValue() || '–'}</span>
            {info.row.original.lineName && <span className="block text-zinc-600">{info.row.original.lineName}</span>}
          </span>
        ),
      }),
      statusColumn(column),
      actionsColumn(column, { onEdit, onNotice, consequences, setActive: (id, active) => update({ id, changes: { active } }) }),
    ],
    [onEdit, onNotice, update],
  );
  const table = useReactTable({
    data: products,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });
  return <DataTable table={table} caption="Products" />;
}
