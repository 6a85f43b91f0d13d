import { Button } from './Button';
import { errorMessage } from '@web/lib/http';

/** A failed load: what went wrong in the server's words, and a way to try again. */
export function ErrorState({ title = 'Could not load this page', error, onRetry }: { title?: string; error: unknown; onRetry?: () => void }) {
  return (
    <div role="alert" className="rounded-lg border border-red-200 bg-red-50 px-5 py-4">
      <p className="font-semibold text-red-900">{title}</p>
      <p className="mt-1 text-red-800">{errorMessage(error)}</p>
      {onRetry && (
        <Button variant="secondary" size="sm" className="mt-3" onClick={onRetry}>
          Try again
        </Button>
      )}
    </div>
  );
}
