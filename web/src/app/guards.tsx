import type { ReactNode } from 'react';
import { Navigate, useLocation } from 'react-router-dom';
import { useSession } from '@web/lib/session';
import { Loading } from '../components/ui/Spinner';
import { ErrorState } from '../components/ui/ErrorState';
import { NotAllowedPage } from './routes/NotAllowedPage';
import type { Permission } from '@shared/permissions';
import { useMay } from './permissions';

/** Where the sign-in page sends the user afterwards: the page they asked for. */
export interface SignInState {
  from?: string;
}

/** Renders its children only for a signed-in user; everyone else goes to sign-in and comes back. */
export function RequireAuth({ children }: { children: ReactNode }) {
  const session = useSession();
  const location = useLocation();

  if (session.isPending) return <Loading label="Checking your session…" className="justify-center py-24" />;
  if (session.isError) {
    return (
      <div className="mx-auto max-w-xl p-6">
        <ErrorState title="Could not check your session" error={session.error} onRetry={() => session.refetch()} />
      </div>
    );
  }
  if (!session.data) {
    const state: SignInState = { from: location.pathname + location.search + location.hash };
    return <Navigate to="/sign-in" replace state={state} />;
  }
  return children;
}

/** Client-side permission check for a route; the API refuses the data to other roles in any case. */
export function RequirePermission({ action, children }: { action: Permission; children: ReactNode }) {
  if (!useMay(action)) return <NotAllowedPage />;
  return children;
}
