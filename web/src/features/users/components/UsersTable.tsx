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
import { formatDate } from '../../../lib/format';
import { DataTable } from '../../../components/ui/Table';
import { Badge } from '../../../components/ui/Badge';
import { Input } from '../../../components/ui/Field';
import { EmptyState } from '../../../components/ui/EmptyState';
import { RoleSelect, UserActions, type Notice } from './UserActions';

const column = createColumnHelper<PublicUser>();

/** The filter looks at what identifies a person; not at the status, since "active" is part of "deactivated". */
function matches(user: PublicUser, query: string): boolean {
  const needle = query.trim().toLowerCase();
  return [user.name, user.email, roleLabels[user.role]].some((text) => text.toLowerCase().includes(needle));
}

export function UsersTable({ users, currentUserId, onNotice }: { users: PublicUser[]; currentUserId: number; onNotice: (notice: Notice) => void }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: 'name', desc: false }]);
  const [filter, setFilter] = useState('');

  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Name and e-mail',
        cell: (info) => (
          <>
            <span className="block font-medium">{info.getValue()}</span>
            <span className="block text-sm text-zinc-600">{info.row.original.email}</span>
          </>
        ),
      }),
      // Sorted by the words people read, not the stored codes.
      column.accessor((user) => roleLabels[user.role], {
        id: 'role',
        header: 'Role',
        cell: (info) => <RoleSelect user={info.row.original} isSelf={info.row.original.id === currentUserId} onNotice={onNotice} />,
      }),
      column.accessor((user) => (user.active ? 'Active' : 'Deactivated'), {
        id: 'status',
        header: 'Status',
        cell: (info) => <Badge tone={info.row.original.active ? 'positive' : 'neutral'}>{info.getValue()}</Badge>,
      }),
      column.accessor('createdAt', {
        header: 'Created',
        cell: (info) => <span className="font-mono text-sm whitespace-nowrap">{formatDate(info.getValue())}</span>,
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
    globalFilterFn: (row, _columnId, query: string) => matches(row.original, query),
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
