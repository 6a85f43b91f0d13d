import { flexRender, type Header, type Table as TableInstance } from '@tanstack/react-table';
import type { ReactNode } from 'react';
import { cx } from './cx';

/**
 * Renders a @tanstack/react-table instance the same way on every screen: sortable column headers
 * as buttons with aria-sort, tabular figures, and a horizontal scroll on narrow screens.
 * Columns may set `meta: { numeric: true }` to right-align figures.
 */
export function DataTable<T>({ table, caption, empty }: { table: TableInstance<T>; caption: string; empty?: ReactNode }) {
  const rows = table.getRowModel().rows;
  return (
    <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
      <table className="w-full border-collapse text-left text-base">
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-zinc-100/80 text-sm text-zinc-700">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => (
                <th
                  key={header.id}
                  scope="col"
                  aria-sort={ariaSort(header)}
                  className={cx('border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap', isNumeric(header) && 'text-right')}
                >
                  {header.isPlaceholder ? null : <HeaderLabel header={header} />}
                </th>
              ))}
            </tr>
          ))}
        </thead>
        <tbody>
          {rows.map((row) => (
            <tr key={row.id} className="border-b border-zinc-100 last:border-b-0 hover:bg-zinc-50">
              {row.getVisibleCells().map((cell) => (
                <td
                  key={cell.id}
                  className={cx('px-3 py-2 align-middle', (cell.column.columnDef.meta as ColumnMeta | undefined)?.numeric && 'text-right font-mono')}
                >
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
      {rows.length === 0 && empty && <div className="p-4">{empty}</div>}
    </div>
  );
}

interface ColumnMeta {
  numeric?: boolean;
}

function isNumeric<T>(header: Header<T, unknown>) {
  return !!(header.column.columnDef.meta as ColumnMeta | undefined)?.numeric;
}

function ariaSort<T>(header: Header<T, unknown>): 'ascending' | 'descending' | 'none' | undefined {
  if (!header.column.getCanSort()) return undefined;
  const sorted = header.column.getIsSorted();
  return sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : 'none';
}

function HeaderLabel<T>({ header }: { header: Header<T, unknown> }) {
  const label = flexRender(header.column.columnDef.header, header.getContext());
  if (!header.column.getCanSort()) return <>{label}</>;
  const sorted = header.column.getIsSorted();
  return (
    <button
      type="button"
      onClick={header.column.getToggleSortingHandler()}
      className="inline-flex items-center gap-1 rounded hover:text-zinc-950 focus-visible:outline-2 focus-visible:outline-accent-600"
    >
      {label}
      <span aria-hidden="true" className={cx('text-xs', sorted ? 'text-accent-700' : 'text-zinc-400')}>
        {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
      </span>
    </button>
  );
}

/** A table of hand-written rows with the same frame, caption and header row as DataTable: for rows that are not one record a cell. */
export function PlainTable({ caption, headings, children }: { caption: string; headings: readonly string[]; children: ReactNode }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
      <table className="w-full border-collapse text-left">
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-zinc-100/80 text-sm text-zinc-700">
          <tr>
            {headings.map((h, i) => (
              <th key={`${h}-${i}`} scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>{children}</tbody>
      </table>
    </div>
  );
}
