import { useState } from 'react';
import { useUsers } from '../api/users';
import { useSignedInUser } from '../../auth/api/session';
import { UsersTable } from '../components/UsersTable';
import { CreateUserForm } from '../components/CreateUserForm';
import type { Notice } from '../components/UserActions';
import { PageHeader } from '../../../components/ui/PageHeader';
import { Card } from '../../../components/ui/Card';
import { Alert } from '../../../components/ui/Alert';
import { Loading } from '../../../components/ui/Spinner';
import { ErrorState } from '../../../components/ui/ErrorState';
import { EmptyState } from '../../../components/ui/EmptyState';

export default function UsersPage() {
  const me = useSignedInUser();
  const users = useUsers();
  const [notice, setNotice] = useState<Notice | null>(null);

  return (
    <>
      <PageHeader
        title="Users"
        description="Who may sign in to Prismline and in which role. Deactivated users keep their name on the records they made."
      />
      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_22rem]">
        <div className="min-w-0 space-y-4">
          {notice && <Alert tone={notice.tone}>{notice.text}</Alert>}
          {users.isPending ? (
            <Loading label="Loading users…" />
          ) : users.isError ? (
            <ErrorState title="Could not load the users" error={users.error} onRetry={() => users.refetch()} />
          ) : users.data.length === 0 ? (
            <EmptyState title="No users yet">Add the first one with the form.</EmptyState>
          ) : (
            <UsersTable users={users.data} currentUserId={me.id} onNotice={setNotice} />
          )}
        </div>
        <Card title="Add a user" className="self-start">
          <CreateUserForm onCreated={(user) => setNotice({ tone: 'success', text: `${user.name} can now sign in as ${user.email}.` })} />
        </Card>
      </div>
    </>
  );
}
