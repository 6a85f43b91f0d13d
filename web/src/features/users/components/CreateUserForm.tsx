import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { createUserSchema, type PublicUser } from '@shared/schemas/users';
import { showServerErrors } from '@web/lib/forms';
import { useCreateUser } from '../api/users';
import { Field, Input, Select } from '@web/components/ui/Field';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { RoleOptions } from './RoleOptions';

const fields = ['name', 'email', 'role', 'password'] as const;

export function CreateUserForm({ onCreated, onCancel }: { onCreated: (user: PublicUser) => void; onCancel: () => void }) {
  const createUser = useCreateUser();
  const {
    register,
    handleSubmit,
    setError,
    reset,
    formState: { errors },
  } = useForm({
    resolver: zodResolver(createUserSchema),
    defaultValues: { name: '', email: '', role: 'technician' as const, password: '' },
  });

  const onSubmit = handleSubmit((input) =>
    createUser.mutate(input, {
      onSuccess: (user) => {
        reset();
        onCreated(user);
      },
      onError: (error) => {
        // A 409 names the e-mail field: the address belongs to someone already.
        showServerErrors(error, setError, fields);
      },
    }),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5" aria-label="Add a user">
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-x-5 gap-y-4 sm:grid-cols-2">
        <Field label="Full name" hint="As it should appear in records and the audit trail." error={errors.name?.message}>
          {(control) => <Input {...control} autoComplete="off" {...register('name')} />}
        </Field>
        <Field label="E-mail" error={errors.email?.message}>
          {(control) => <Input {...control} type="email" autoComplete="off" {...register('email')} />}
        </Field>
        <Field label="Role" error={errors.role?.message}>
          {(control) => (
            <Select {...control} {...register('role')}>
              <RoleOptions />
            </Select>
          )}
        </Field>
        <Field label="First password" hint="At least 10 characters. Hand it over in person." error={errors.password?.message}>
          {(control) => <Input {...control} type="password" autoComplete="new-password" {...register('password')} />}
        </Field>
      </div>
      <div className="flex gap-2">
        <Button type="submit" busy={createUser.isPending}>
          Add user
        </Button>
        <Button variant="secondary" onClick={onCancel}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
