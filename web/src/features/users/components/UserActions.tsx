import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { createUserSchema, roleLabels, type PublicUser, type Role } from '@shared/schemas/users';
import { errorMessage } from '@web/lib/http';
import { showServerErrors } from '@web/lib/forms';
import { useUpdateUser } from '../api/users';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { RoleOptions } from './RoleOptions';
import { Dialog } from '@web/components/ui/Dialog';
import { Field, Input, Select } from '@web/components/ui/Field';
import type { Notice } from '@web/components/ui/Notice';

type Open = 'none' | 'activity' | 'password';

/** The role of one user, changed on the spot. An administrator cannot demote themselves here. */
export function RoleSelect({ user, isSelf, onNotice }: { user: PublicUser; isSelf: boolean; onNotice: (notice: Notice) => void }) {
  const update = useUpdateUser();
  const changeRole = (role: Role) =>
    update.mutate(
      { id: user.id, changes: { role } },
      {
        onSuccess: () => onNotice({ tone: 'success', text: `${user.name} is now ${roleLabels[role]}.` }),
        onError: (error) => onNotice({ tone: 'error', text: `Could not change the role of ${user.name}: ${errorMessage(error)}` }),
      },
    );
  return (
    <div className="w-48">
      <Select
        aria-label={`Role of ${user.name}`}
        title={isSelf ? 'You cannot change the role of your own account' : undefined}
        value={user.role}
        disabled={isSelf || update.isPending}
        onChange={(event) => changeRole(event.target.value as Role)}
        className="h-9 text-sm"
      >
        <RoleOptions />
      </Select>
    </div>
  );
}

/** Activity and password of one user. An administrator cannot lock themselves out here. */
export function UserActions({ user, isSelf, onNotice }: { user: PublicUser; isSelf: boolean; onNotice: (notice: Notice) => void }) {
  const update = useUpdateUser();
  const [open, setOpen] = useState<Open>('none');

  const changeActivity = () =>
    update.mutate(
      { id: user.id, changes: { active: !user.active } },
      {
        onSuccess: () =>
          onNotice({ tone: 'success', text: user.active ? `${user.name} is deactivated and can no longer sign in.` : `${user.name} can sign in again.` }),
        onError: (error) => onNotice({ tone: 'error', text: `Could not change ${user.name}: ${errorMessage(error)}` }),
        onSettled: () => setOpen('none'),
      },
    );

  return (
    <div className="flex items-center gap-2">
      <Button variant="secondary" size="sm" title={isSelf ? 'You cannot deactivate your own account' : undefined} disabled={isSelf || update.isPending} onClick={() => setOpen('activity')}>
        {user.active ? 'Deactivate' : 'Reactivate'}
      </Button>
      <Button variant="secondary" size="sm" disabled={update.isPending} onClick={() => setOpen('password')}>
        Set password
      </Button>

      {open === 'activity' && (
        <Dialog title={user.active ? `Deactivate ${user.name}?` : `Reactivate ${user.name}?`} onClose={() => setOpen('none')}>
          <p className="text-zinc-700">
            {user.active
              ? 'They can no longer sign in. Their name stays on every record they entered or changed.'
              : 'They can sign in again with their current password, in the role shown.'}
          </p>
          <div className="mt-5 flex justify-end gap-2">
            <Button variant="secondary" onClick={() => setOpen('none')}>
              Cancel
            </Button>
            <Button variant={user.active ? 'danger' : 'primary'} busy={update.isPending} onClick={changeActivity}>
              {user.active ? 'Deactivate' : 'Reactivate'}
            </Button>
          </div>
        </Dialog>
      )}

      {open === 'password' && (
        <SetPasswordDialog
          user={user}
          onClose={() => setOpen('none')}
          onDone={() => {
            setOpen('none');
            onNotice({ tone: 'success', text: `New password set for ${user.name}. Hand it over in person.` });
          }}
        />
      )}
    </div>
  );
}

const passwordSchema = createUserSchema.pick({ password: true });

function SetPasswordDialog({ user, onClose, onDone }: { user: PublicUser; onClose: () => void; onDone: () => void }) {
  const update = useUpdateUser();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(passwordSchema), defaultValues: { password: '' } });

  const onSubmit = handleSubmit(({ password }) =>
    update.mutate(
      { id: user.id, changes: { password } },
      {
        onSuccess: onDone,
        onError: (error) => {
          showServerErrors(error, setError, ['password']);
        },
      },
    ),
  );

  return (
    <Dialog title={`Set a new password for ${user.name}`} onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <Field label="New password" hint="At least 10 characters. The old password stops working at once." error={errors.password?.message}>
          {(control) => <Input {...control} type="password" autoComplete="new-password" autoFocus {...register('password')} />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
          <Button type="submit" busy={update.isPending}>
            Set password
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
