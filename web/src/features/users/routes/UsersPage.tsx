import { useState } from 'react';
import { useUsers } from '../api/users';
import { useSignedInUser } from '@web/lib/session';
import { UsersTable } from '../components/UsersTable';
import { CreateUserForm } from '../components/CreateUserForm';
import type { Notice } from '@web/components/ui/Notice';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

export default function UsersPage() {
  const me = useSignedInUser();
  const users = useUsers();
  const [notice, setNotice] = useState<Notice | null>(null);
  const [adding, setAdding] = useState(false);

  return (
    <>
      <PageHeader
        title="Users"
        description="Who may sign in to Prismline and in which role. Deactivated users keep their name on the records they made."
        actions={
          <Button onClick={() => setAdding(true)} disabled={adding}>
            Add a user
          </Button>
        }
      />
      <div className="space-y-4">
        {adding && (
          <Card title="Add a user">
            <CreateUserForm
              onCancel={() => setAdding(false)}
              onCreated={(user) => {
                setAdding(false);
                setNotice({ tone: 'success', text: `${user.name} can now sign in as ${user.email}.` });
              }}
            />
          </Card>
        )}
        {notice && <Alert tone={notice.tone}>{notice.text}</Alert>}
        {users.isPending ? (
          <Loading label="Loading users…" />
        ) : users.isError ? (
          <ErrorState title="Could not load the users" error={users.error} onRetry={() => users.refetch()} />
        ) : users.data.length === 0 ? (
          <EmptyState title="No users yet">Add the first one with “Add a user”.</EmptyState>
        ) : (
          <UsersTable users={users.data} currentUserId={me.id} onNotice={setNotice} />
        )}
      </div>
    </>
  );
}
