import { Navigate, useLocation } from 'react-router-dom';
import { useSession } from '@web/lib/session';
import { SignInForm } from '../components/SignInForm';
import { SafetyNote } from '@web/components/SafetyNote';
import { Loading } from '@web/components/ui/Spinner';
import type { SignInState } from '@web/app/guards';

/** Only paths inside the app count, so a crafted link cannot send a fresh session elsewhere. */
function returnPath(state: unknown): string {
  const from = (state as SignInState | null)?.from;
  return typeof from === 'string' && from.startsWith('/') && !from.startsWith('//') && !from.startsWith('/sign-in') ? from : '/';
}

export default function SignInPage() {
  const session = useSession();
  const location = useLocation();
  const target = returnPath(location.state);

  if (session.isPending) return <Loading label="Checking your session…" className="justify-center py-24" />;
  if (session.data) return <Navigate to={target} replace />;

  return (
    <div className="flex min-h-dvh flex-col items-center justify-center bg-zinc-100 px-4 py-10">
      <main className="w-full max-w-md">
        <div className="mb-6 text-center">
          <h1 className="text-3xl font-semibold tracking-tight text-accent-800">Prismline</h1>
          <p className="mt-2 text-zinc-600">Test results, control charts and quality records for the mortar plant laboratory</p>
        </div>
        <div className="rounded-lg border border-zinc-200 bg-white px-6 py-6 shadow-sm">
          <h2 className="mb-5 text-lg font-semibold">Sign in</h2>
          <SignInForm />
        </div>
        <SafetyNote className="mt-6 text-center text-sm text-zinc-500" />
      </main>
    </div>
  );
}
