import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { loginSchema, type LoginInput } from '@shared/schemas/users';
import { ApiError } from '@web/lib/http';
import { showServerFieldErrors } from '@web/lib/forms';
import { useSignIn } from '@web/lib/session';
import { Field, Input } from '@web/components/ui/Field';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';

/** Says why sign-in failed in words a technician at the end of a shift can act on. */
function signInFailure(error: unknown): string {
  if (!(error instanceof ApiError)) return 'Sign-in failed. Try again.';
  if (error.status >= 500) {
    return `The server could not sign you in (error ${error.status}). Try again; if it keeps happening, tell your administrator.`;
  }
  // Wrong credentials, a deactivated account, too many attempts or no connection: the message says which.
  return error.message;
}

/** On success the session cache holds the user, and the sign-in page moves on by itself. */
export function SignInForm() {
  const signIn = useSignIn();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<LoginInput>({ resolver: zodResolver(loginSchema), defaultValues: { email: '', password: '' } });

  const onSubmit = handleSubmit((input) =>
    signIn.mutate(input, { onError: (error) => showServerFieldErrors(error, setError, ['email', 'password']) }),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5">
      {signIn.isError && <Alert tone="error">{signInFailure(signIn.error)}</Alert>}
      <Field label="E-mail" error={errors.email?.message}>
        {(control) => <Input {...control} type="email" autoComplete="username" autoFocus {...register('email')} />}
      </Field>
      <Field label="Password" error={errors.password?.message}>
        {(control) => <Input {...control} type="password" autoComplete="current-password" {...register('password')} />}
      </Field>
      <Button type="submit" className="w-full" busy={signIn.isPending}>
        {signIn.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
