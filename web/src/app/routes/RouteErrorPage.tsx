import { useRouteError } from 'react-router-dom';
import { ErrorState } from '@web/components/ui/ErrorState';

/** Catches a page that failed to render or to load its code (for example after a new release). */
export function RouteErrorPage() {
  const error = useRouteError();
  return (
    <div className="mx-auto max-w-2xl p-6">
      <ErrorState title="This page failed to open" error={error} onRetry={() => window.location.reload()} />
    </div>
  );
}
