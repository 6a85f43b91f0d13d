import { useState, type ReactNode } from 'react';
import { getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { Input } from './Field';

/**
 * A sortable table instance narrowed by one typed filter, which `matches` applies to whole rows (the
 * words people read, not the stored codes). Render it with `DataTable` below a `TableFilter`.
 */
export function useFilteredTable<T>({
  data,
  columns,
  matches,
  initialSorting = [],
}: {
  data: T[];
  /** Columns of mixed value types, as createColumnHelper gives them (typed as useReactTable takes them). */
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- TanStack Table types a list of columns of different value types only as ColumnDef<T, any>
  columns: ColumnDef<T, any>[];
  matches: (row: T, query: string) => boolean;
  initialSorting?: SortingState;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const [filter, setFilter] = useState('');
  const table = useReactTable({
    data,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: (row, _columnId, query: string) => matches(row.original, query),
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  return { table, filter, setFilter, shown: table.getRowModel().rows.length };
}

/** The filter field above a table, any further controls, and how many of how many rows are shown. */
export function TableFilter({
  id,
  placeholder,
  value,
  onChange,
  shown,
  total,
  noun,
  children,
}: {
  id: string;
  placeholder: string;
  value: string;
  onChange: (value: string) => void;
  shown: number;
  total: number;
  /** Plural of what the rows are, e.g. "users". */
  noun: string;
  children?: ReactNode;
}) {
  return (
    <div className="flex flex-wrap items-center gap-3">
      <label htmlFor={id} className="text-sm font-medium text-zinc-800">
        Filter
      </label>
      <Input id={id} type="search" placeholder={placeholder} value={value} onChange={(event) => onChange(event.target.value)} className="max-w-xs" />
      {children}
      <p className="figures text-sm text-zinc-600" aria-live="polite">
        {shown === total ? `${total} ${noun}` : `${shown} of ${total} ${noun}`}
      </p>
    </div>
  );
}
