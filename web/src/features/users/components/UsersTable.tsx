import { useMemo, useState } from 'react';
import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { roleLabels, type PublicUser } from '../../../../../shared/schemas/users';
import { formatDateTime } from '../../../lib/format';
import { DataTable } from '../../../components/ui/Table';
import { Badge } from '../../../components/ui/Badge';
import { Input } from '../../../components/ui/Field';
import { EmptyState } from '../../../components/ui/EmptyState';
import { UserActions, type Notice } from './UserActions';

const column = createColumnHelper<PublicUser>();

export function UsersTable({ users, currentUserId, onNotice }: { users: PublicUser[]; currentUserId: number; onNotice: (notice: Notice) => void }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'name', desc: false }]);
  const [filter, setFilter] = useState('');

  const columns = useMemo(
    () => [
      column.accessor('name', { header: 'Name', cell: (info) => <span className="font-medium">{info.getValue()}</span> }),
      column.accessor('email', { header: 'E-mail', cell: (info) => <span className="break-all">{info.getValue()}</span> }),
      // Sorted and filtered by the words people read, not the stored codes.
      column.accessor((user) => roleLabels[user.role], { id: 'role', header: 'Role' }),
      column.accessor((user) => (user.active ? 'Active' : 'Deactivated'), {
        id: 'status',
        header: 'Status',
        // "active" is part of "deactivated", so a text filter on this column would mislead.
        enableGlobalFilter: false,
        cell: (info) => <Badge tone={info.row.original.active ? 'positive' : 'neutral'}>{info.getValue()}</Badge>,
      }),
      column.accessor('createdAt', {
        header: 'Created',
        enableGlobalFilter: false,
        cell: (info) => <span className="font-mono text-sm whitespace-nowrap">{formatDateTime(info.getValue())}</span>,
      }),
      column.display({
        id: 'actions',
        header: 'Actions',
        cell: (info) => <UserActions user={info.row.original} isSelf={info.row.original.id === currentUserId} onNotice={onNotice} />,
      }),
    ],
    [currentUserId, onNotice],
  );

  const table = useReactTable({
    data: users,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: 'includesString',
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  const shown = table.getRowModel().rows.length;

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <label htmlFor="user-filter" className="text-sm font-medium text-zinc-800">
          Filter
        </label>
        <Input
          id="user-filter"
          type="search"
          placeholder="Name, e-mail or role"
          value={filter}
          onChange={(event) => setFilter(event.target.value)}
          className="max-w-xs"
        />
        <p className="figures text-sm text-zinc-600" aria-live="polite">
          {shown === users.length ? `${users.length} users` : `${shown} of ${users.length} users`}
        </p>
      </div>
      <DataTable
        table={table}
        caption="Users of Prismline"
        empty={<EmptyState title="No user matches the filter">Clear the filter to see everyone.</EmptyState>}
      />
    </div>
  );
}
