import { useMemo } from 'react';
import { createColumnHelper } from '@tanstack/react-table';
import { roleLabels, type PublicUser } from '@shared/schemas/users';
import { PlantTime } from '@web/components/PlantTime';
import { DataTable } from '@web/components/ui/Table';
import { Badge } from '@web/components/ui/Badge';
import { TableFilter, useFilteredTable } from '@web/components/ui/FilteredTable';
import { EmptyState } from '@web/components/ui/EmptyState';
import type { Notice } from '@web/components/ui/Notice';
import { RoleSelect, UserActions } from './UserActions';

const column = createColumnHelper<PublicUser>();

/** The filter looks at what identifies a person; not at the status, since "active" is part of "deactivated". */
function matches(user: PublicUser, query: string): boolean {
  const needle = query.trim().toLowerCase();
  return [user.name, user.email, roleLabels[user.role]].some((text) => text.toLowerCase().includes(needle));
}

export function UsersTable({ users, currentUserId, onNotice }: { users: PublicUser[]; currentUserId: number; onNotice: (notice: Notice) => void }) {
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
        cell: (info) => <span className="font-mono text-sm whitespace-nowrap"><PlantTime at={info.getValue()} kind="date" /></span>,
      }),
      column.display({
        id: 'actions',
        header: 'Actions',
        cell: (info) => <UserActions user={info.row.original} isSelf={info.row.original.id === currentUserId} onNotice={onNotice} />,
      }),
    ],
    [currentUserId, onNotice],
  );

  const { table, filter, setFilter, shown } = useFilteredTable({ data: users, columns, matches, initialSorting: [{ id: 'name', desc: false }] });

  return (
    <div className="space-y-3">
      <TableFilter id="user-filter" placeholder="Name, e-mail or role" value={filter} onChange={setFilter} shown={shown} total={users.length} noun="users" />
      <DataTable
        table={table}
        caption="Users of Prismline"
        empty={<EmptyState title="No user matches the filter">Clear the filter to see everyone.</EmptyState>}
      />
    </div>
  );
}
